/** The text a new procedure starts from: valid, with one step, and a reminder of the cautions. */
export const NEW_PROCEDURE = `---
title: New procedure
family: KTX-7 (invented seven-speed dual-clutch transaxle)
purpose: Say in one sentence why and when to use it.
specs: Invented for the demo; not service data.
---

> Warning: Follow the manufacturer's service information, local codes and licensed practice.

## First step

Describe the work here. Use "Insert a checkpoint" to add torque, measure, confirm or part checks.
`;
