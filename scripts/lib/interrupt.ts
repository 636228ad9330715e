/**
 * Ctrl-C, `kill` and a closed terminal for scripts that own a throwaway cluster: without a handler Node dies on the
 * spot and the script's `finally` (stop the cluster, delete its directory) never runs, leaving a postmaster behind.
 */

import { constants } from 'node:os';

/** The signals that end a script from outside. */
export const ENDING_SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;
export type EndingSignal = (typeof ENDING_SIGNALS)[number];

/**
 * The status a shell reports for a command ended by `signal`: 128 + the signal's number (POSIX Shell Command Language,
 * 2.8.2 "Exit Status for Commands" says greater than 128; bash documents 128 + n — from memory).
 */
export const signalExitCode = (signal: EndingSignal): number => 128 + constants.signals[signal];

/**
 * Calls `onSignal` on the first ending signal instead of dying, so the caller can stop what it runs and reach its
 * cleanup. A second signal exits at once (the user insists), with the shell's status for it.
 */
export function onInterrupt(onSignal: (signal: EndingSignal) => void): void {
	let received: EndingSignal | null = null;
	for (const signal of ENDING_SIGNALS)
		process.on(signal, () => {
			if (received) process.exit(signalExitCode(signal));
			received = signal;
			onSignal(signal);
		});
}
