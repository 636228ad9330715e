import { describe, expect, it } from 'vitest';
import { CopyBinaryReader, CopyFormatError, type CopyRow } from './copy-binary';

/** Binary COPY bytes as the PostgreSQL 15 manual's "Binary Format" section lays them out (from memory). */
function encode(rows: (string | number | null)[][], extension = Buffer.alloc(0)): Buffer {
	const parts: Buffer[] = [Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1')];
	const word = (n: number) => {
		const b = Buffer.alloc(4);
		b.writeInt32BE(n);
		return b;
	};
	parts.push(word(0), word(extension.length), extension);
	for (const row of rows) {
		const count = Buffer.alloc(2);
		count.writeInt16BE(row.length);
		parts.push(count);
		for (const field of row) {
			if (field === null) parts.push(word(-1));
			else if (typeof field === 'number') parts.push(word(4), word(field));
			else {
				const bytes = Buffer.from(field, 'utf8');
				parts.push(word(bytes.length), bytes);
			}
		}
	}
	const end = Buffer.alloc(2);
	end.writeInt16BE(-1);
	parts.push(end);
	return Buffer.concat(parts);
}

const rows = [
	['4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a', 1, null, '{"body":{"text":"Rayure légère \u{1F527}"}}'],
	['4b6f2a30-8d1e-4c55-9a7e-2f0c1d3e4b5a', 2, 'a'.repeat(64), ''],
	['5c7f3b41-9e2f-4d66-8b8f-3a1d2e4f5c6b', 1, null, '{"body":{}}']
];

/** The rows as JS values again: text fields as strings, the int4 as a number. */
const decode = (got: CopyRow[]) =>
	got.map((r) => [
		r[0]!.toString('utf8'),
		r[1]!.readInt32BE(0),
		r[2]?.toString('utf8') ?? null,
		r[3]!.toString('utf8')
	]);

describe('CopyBinaryReader', () => {
	it('reads every row of one whole buffer, NULLs and empty text apart', () => {
		const reader = new CopyBinaryReader();
		expect(decode(reader.push(encode(rows)))).toEqual(rows);
		expect(reader.done).toBe(true);
		expect(() => reader.finish()).not.toThrow();
	});

	it('reads the same rows however the stream cuts the bytes (every split point, and byte by byte)', () => {
		const bytes = encode(rows, Buffer.from('ext'));
		for (let cut = 0; cut <= bytes.length; cut++) {
			const reader = new CopyBinaryReader();
			const got = [...reader.push(bytes.subarray(0, cut)), ...reader.push(bytes.subarray(cut))];
			expect(decode(got)).toEqual(rows);
			reader.finish();
		}
		const reader = new CopyBinaryReader();
		const got: CopyRow[] = [];
		for (let i = 0; i < bytes.length; i++) got.push(...reader.push(bytes.subarray(i, i + 1)));
		expect(decode(got)).toEqual(rows);
	});

	it('hands each row to a callback as offsets into the buffer, NULL as length -1, the same fields push returns', () => {
		const bytes = encode(rows);
		for (const cut of [0, 30, 61, bytes.length - 1]) {
			const reader = new CopyBinaryReader();
			const got: CopyRow[] = [];
			const take = (buf: Buffer, fields: Int32Array, count: number) =>
				got.push(
					Array.from({ length: count }, (_, f) =>
						fields[2 * f + 1] === -1
							? null
							: Buffer.from(buf.subarray(fields[2 * f], fields[2 * f] + fields[2 * f + 1]))
					)
				);
			reader.each(bytes.subarray(0, cut), take);
			reader.each(bytes.subarray(cut), take);
			expect(decode(got)).toEqual(rows);
			reader.finish();
		}
	});

	it('refuses bytes that are not binary COPY, and data that stops before its end marker', () => {
		expect(() => new CopyBinaryReader().push(Buffer.from('id\trun\n1\t2\n----------------'))).toThrow(CopyFormatError);
		const cut = new CopyBinaryReader();
		cut.push(encode(rows).subarray(0, 40));
		expect(() => cut.finish()).toThrow(/before its end marker/);
		const trailing = new CopyBinaryReader();
		expect(() => trailing.push(Buffer.concat([encode(rows), Buffer.from([0])]))).toThrow(/after the end/);
	});
});
