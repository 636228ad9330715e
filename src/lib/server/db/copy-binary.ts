/**
 * Rows of PostgreSQL's binary COPY format (`COPY … TO STDOUT (FORMAT binary)`), as the stream delivers it in chunks
 * of any size: an 11-byte signature, a flags word and a header extension, then per row a 16-bit field count and per
 * field a 32-bit length (−1 for NULL) and that many bytes, and a field count of −1 to end. Fields are returned as
 * views of the chunk (no copy), so a text field is its UTF-8 bytes and an `int4` its 4 big-endian bytes. Layout as in
 * the PostgreSQL 15 manual, COPY, "Binary Format" (from memory).
 */

const SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1');

/** One row: a view of each field's bytes, null for SQL NULL. */
export type CopyRow = (Buffer | null)[];

/** Thrown on bytes that are not binary COPY: the verify that reads them cannot trust a guess. */
export class CopyFormatError extends Error {}

export class CopyBinaryReader {
	private rest: Buffer = Buffer.alloc(0);
	private headerRead = false;
	private ended = false;
	private fields = new Int32Array(32);

	/** Whether the end-of-data marker has been read. */
	get done(): boolean {
		return this.ended;
	}

	/** The complete rows in `chunk` and what was left of earlier chunks; a row cut at the end waits for the next. */
	push(chunk: Buffer): CopyRow[] {
		const rows: CopyRow[] = [];
		this.each(chunk, (buf, fields, count) => {
			const row: CopyRow = new Array(count);
			for (let f = 0; f < count; f++) {
				const length = fields[2 * f + 1];
				row[f] = length === -1 ? null : buf.subarray(fields[2 * f], fields[2 * f] + length);
			}
			rows.push(row);
		});
		return rows;
	}

	/**
	 * {@link push} without a view per field: `onRow` gets the buffer and, for field `f`, its start at
	 * `fields[2f]` and its length at `fields[2f + 1]` (−1 for NULL), `count` fields in all. The buffer and the array
	 * are reused: valid only during the call. A view per field cost verify-all a tenth of its time in allocation and
	 * garbage collection (CPU profile, 1M records).
	 */
	each(chunk: Buffer, onRow: (buf: Buffer, fields: Int32Array, count: number) => void): void {
		if (this.ended) {
			if (chunk.length === 0) return;
			throw new CopyFormatError('Bytes after the end of the COPY data.');
		}
		const buf = this.rest.length === 0 ? chunk : Buffer.concat([this.rest, chunk]);
		let at = 0;
		if (!this.headerRead) {
			if (buf.length < SIGNATURE.length + 8) {
				this.rest = buf;
				return;
			}
			if (buf.compare(SIGNATURE, 0, SIGNATURE.length, 0, SIGNATURE.length) !== 0) {
				throw new CopyFormatError('The data does not begin with the binary COPY signature.');
			}
			const extension = buf.readUInt32BE(SIGNATURE.length + 4);
			if (buf.length < SIGNATURE.length + 8 + extension) {
				this.rest = buf;
				return;
			}
			at = SIGNATURE.length + 8 + extension;
			this.headerRead = true;
		}
		for (;;) {
			if (buf.length - at < 2) break;
			const count = buf.readInt16BE(at);
			if (count === -1) {
				this.ended = true;
				if (at + 2 !== buf.length) throw new CopyFormatError('Bytes after the end of the COPY data.');
				at += 2;
				break;
			}
			if (count < 0) throw new CopyFormatError(`A row declares ${count} fields.`);
			if (2 * count > this.fields.length) this.fields = new Int32Array(2 * count);
			const fields = this.fields;
			let p = at + 2;
			let complete = true;
			for (let f = 0; f < count; f++) {
				if (buf.length - p < 4) {
					complete = false;
					break;
				}
				const length = buf.readInt32BE(p);
				p += 4;
				fields[2 * f] = p;
				fields[2 * f + 1] = length;
				if (length === -1) continue;
				if (length < 0) throw new CopyFormatError(`A field declares ${length} bytes.`);
				if (buf.length - p < length) {
					complete = false;
					break;
				}
				p += length;
			}
			if (!complete) break;
			at = p;
			onRow(buf, fields, count);
		}
		// Copied: views handed out keep the old chunk alive, the rest must not pin it for longer.
		this.rest = at === buf.length ? Buffer.alloc(0) : Buffer.from(buf.subarray(at));
	}

	/** Throws unless the data ended with its end marker and nothing is left over. */
	finish(): void {
		if (!this.ended) throw new CopyFormatError('The COPY data ended before its end marker.');
	}
}
