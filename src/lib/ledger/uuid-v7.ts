/**
 * UUID version 7 (RFC 9562 §5.7, from memory): 48-bit big-endian Unix time in milliseconds, the 4-bit version 0111,
 * 12 bits `rand_a`, the 2-bit variant 10, 62 bits `rand_b`. Ids made later sort later as text, which keeps a
 * device's records in the order it made them and B-tree inserts append-mostly.
 *
 * Within one millisecond (or when the clock steps back) `rand_a` is used as a counter, RFC 9562 §6.2 method 1
 * ("fixed bit-length dedicated counter", from memory): it starts from a random value with its top bit clear, so at
 * least 2048 ids fit in a millisecond; past that the timestamp is advanced by one, which §6.2 allows.
 *
 * Randomness comes from `crypto.getRandomValues`, which browsers offer on plain http too (a shop tablet on the LAN),
 * unlike `crypto.randomUUID`, which needs a secure context.
 */

/** What a generator needs; injectable so tests can fix the clock and the randomness. */
export interface UuidV7Sources {
	now: () => number;
	random: (bytes: Uint8Array<ArrayBuffer>) => void;
}

const defaultSources: UuidV7Sources = {
	now: () => Date.now(),
	random: (bytes) => {
		globalThis.crypto.getRandomValues(bytes);
	}
};

const HEX = Array.from({ length: 256 }, (_, i) => i.toString(16).padStart(2, '0'));

function format(b: Uint8Array): string {
	let s = '';
	for (let i = 0; i < 16; i++) {
		if (i === 4 || i === 6 || i === 8 || i === 10) s += '-';
		s += HEX[b[i]];
	}
	return s;
}

/**
 * A uuid v7 generator whose ids are strictly increasing (as strings) for as long as it lives, even within one
 * millisecond or if the clock steps back.
 */
export function createUuidV7(sources: UuidV7Sources = defaultSources): () => string {
	let lastMs = -1;
	let counter = 0;
	return () => {
		let ms = Math.max(Math.floor(sources.now()), 0);
		const bytes = new Uint8Array(16);
		sources.random(bytes);
		if (ms > lastMs) {
			counter = ((bytes[6] & 0x07) << 8) | bytes[7]; // 11 random bits: top bit of rand_a clear
		} else {
			ms = lastMs;
			counter++;
			if (counter > 0xfff) {
				ms++;
				counter = ((bytes[6] & 0x07) << 8) | bytes[7];
			}
		}
		lastMs = ms;
		// 48-bit timestamp, big-endian (ms < 2^48 until the year 10889).
		const high = Math.floor(ms / 2 ** 32);
		const low = ms >>> 0;
		bytes[0] = (high >>> 8) & 0xff;
		bytes[1] = high & 0xff;
		bytes[2] = (low >>> 24) & 0xff;
		bytes[3] = (low >>> 16) & 0xff;
		bytes[4] = (low >>> 8) & 0xff;
		bytes[5] = low & 0xff;
		bytes[6] = 0x70 | (counter >>> 8); // version 7
		bytes[7] = counter & 0xff;
		bytes[8] = 0x80 | (bytes[8] & 0x3f); // variant 10
		return format(bytes);
	};
}

/** A new uuid v7 from the process-wide (or page-wide) generator. */
export const uuidv7: () => string = createUuidV7();

const UUID_V7 = /^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

/** True for a lower-case uuid v7 (version nibble 7, variant 10). */
export function isUuidV7(id: string): boolean {
	return UUID_V7.test(id);
}

/** The Unix time in milliseconds inside a uuid v7 (when the device made it — a device clock, not proof of time). */
export function uuidV7Time(id: string): number {
	if (!isUuidV7(id)) throw new Error(`Not a uuid v7: ${id}`);
	return parseInt(id.slice(0, 8) + id.slice(9, 13), 16);
}
