/** Procedure sources for tests: small, valid unless asked otherwise, each with a unique title. */
let counter = 0;

export function procedureSource(over: { title?: string; tolerance?: string; torque?: string; extra?: string } = {}) {
	counter += 1;
	return `---
title: ${over.title ?? `Test procedure ${counter}-${Date.now().toString(36)}`}
family: KTX-7 (invented seven-speed dual-clutch transaxle)
purpose: A procedure made by a test.
specs: Invented for tests; not service data.
---

## Close the valve body

\`\`\`torque cover-screws
target: ${over.torque ?? '8 N·m'}
tolerance: ±10 %
fasteners: 4
\`\`\`

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: ${over.tolerance ?? 'H7'}
\`\`\`
${over.extra ?? ''}`;
}
