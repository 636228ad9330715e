/**
 * Ctrl-C, `kill` and a closed terminal for scripts that own a throwaway cluster: without a handler Node dies on the
 * spot and the script's `finally` (stop the cluster, delete its directory) never runs, leaving a postmaster behind.
 */

/** The signals that end a script from outside. */
export const ENDING_SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;
export type EndingSignal = (typeof ENDING_SIGNALS)[number];

/** The shell's exit status for a process ended by `signal` (128 + its number). */
export const signalExitCode = (signal: EndingSignal): number => ({ SIGHUP: 129, SIGINT: 130, SIGTERM: 143 })[signal];

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
