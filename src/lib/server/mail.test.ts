import { describe, expect, it } from 'vitest';
import { mailInFlight, mailSettled, sendInBackground } from './mail';

/** A promise the test settles by hand. */
function deferred() {
	let resolve!: () => void;
	let reject!: (e: Error) => void;
	const promise = new Promise<void>((res, rej) => {
		resolve = res;
		reject = rej;
	});
	return { promise, resolve, reject };
}

describe('background notifications', () => {
	it('are tracked until they finish, and mailSettled waits for all of them, failed or late', async () => {
		const first = deferred();
		const failing = deferred();
		const late = deferred();
		sendInBackground(first.promise);
		sendInBackground(failing.promise);
		expect(mailInFlight()).toBe(2);
		let settled = false;
		const waiting = mailSettled().then(() => (settled = true));
		first.resolve();
		failing.reject(new Error('relay down'));
		// One more notification started while the caller is already waiting (a later commit's mail).
		sendInBackground(late.promise);
		await new Promise((r) => setTimeout(r, 10));
		expect(settled).toBe(false);
		expect(mailInFlight()).toBe(1);
		late.resolve();
		await waiting;
		expect(settled).toBe(true);
		expect(mailInFlight()).toBe(0);
	});
	it('settles at once when nothing is outstanding', async () => {
		await expect(mailSettled()).resolves.toBeUndefined();
	});
});
