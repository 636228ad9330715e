import { mkdir } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { createRequire } from 'node:module';

// Loaded with Node's own require at run time, like the fake SMTP server: s3rver is CommonJS (Koa, winston) and
// bundling it into the server build is not worth the risk for a dev/demo stand-in.
const require = createRequire(import.meta.url);

interface S3rverInstance {
	run(): Promise<AddressInfo>;
	close(): Promise<void>;
}
type S3rverClass = new (options: {
	address: string;
	port: number;
	directory: string;
	silent: boolean;
	configureBuckets: { name: string }[];
	vhostBuckets: boolean;
}) => S3rverInstance;

/** The key pair s3rver expects: other key ids get InvalidAccessKeyId (it does not verify the signature itself). */
export const FAKE_S3_CREDENTIALS = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } as const;

/**
 * An S3-compatible server on 127.0.0.1 storing objects as files under `dir`, standing in for the shop's object
 * storage in demo mode and tests. Port 0 picks a free port; the one chosen is returned.
 */
export async function startFakeS3(
	port: number,
	dir: string,
	bucket: string
): Promise<{ endpoint: string; port: number; close: () => Promise<void> }> {
	await mkdir(dir, { recursive: true });
	const S3rver = require('s3rver') as S3rverClass;
	const server = new S3rver({
		address: '127.0.0.1',
		port,
		directory: dir,
		silent: true,
		configureBuckets: [{ name: bucket }],
		vhostBuckets: false
	});
	const address = await server.run();
	return {
		endpoint: `http://127.0.0.1:${address.port}`,
		port: address.port,
		close: () => server.close()
	};
}
