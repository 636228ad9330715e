/** The smallest runnable procedure for browser tests: one step measuring one bore. Invented, not service data. */
import { FAMILY } from './runner-support';

/**
 * A procedure whose one step measures bore-1, 22 mm H7 = 22.000–22.021 mm (ISO 286-2: IT7 for 18–30 mm is 21 µm, H
 * puts the lower deviation at 0). `extra` is Markdown appended to the step.
 */
export const oneBoreSource = (title: string, purpose: string, extra = '') => `---
title: ${title}
family: ${FAMILY}
purpose: ${purpose}
specs: Invented for tests; not service data.
---

## Measure the bore

\`\`\`measure bore-1
feature: bore
nominal: 22 mm
tolerance: H7
\`\`\`
${extra}`;
