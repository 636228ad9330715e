import { randomBytes } from 'node:crypto';
import { mkdir, readFile, writeFile } from 'node:fs/promises';
import { dirname } from 'node:path';

/** Reads a generated secret from `file`, creating it (mode 600) on first use. */
export async function fileSecret(file: string, bytes = 33): Promise<string> {
	try {
		const value = (await readFile(file, 'utf8')).trim();
		if (value) return value;
	} catch {
		// first start: fall through and create it
	}
	const value = randomBytes(bytes).toString('base64url');
	await mkdir(dirname(file), { recursive: true });
	await writeFile(file, `${value}\n`, { mode: 0o600 });
	return value;
}
