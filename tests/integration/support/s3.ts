import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { FAKE_S3_CREDENTIALS, startFakeS3 } from '../../../src/lib/server/fake-s3';
import { createObjectStore, type ObjectStore } from '../../../src/lib/server/storage';

export interface TestS3 {
	store: ObjectStore;
	endpoint: string;
	dir: string;
	bucket: string;
	/** Keys of every object the fake holds, read from its directory (not through the API under test). */
	keys: () => Promise<string[]>;
	close: () => Promise<void>;
}

/** The app's S3 fake on a free port over a fresh temp directory, and a client configured as the app configures it. */
export async function startTestS3(bucket = 'benchstamp-test'): Promise<TestS3> {
	const dir = await mkdtemp(join(tmpdir(), 'benchstamp-test-s3-'));
	const fake = await startFakeS3(0, dir, bucket);
	const store = createObjectStore({
		endpoint: fake.endpoint,
		region: 'us-east-1',
		bucket,
		...FAKE_S3_CREDENTIALS,
		pathStyle: true
	});
	return {
		store,
		endpoint: fake.endpoint,
		dir,
		bucket,
		keys: async () => {
			const files = await readdir(join(dir, bucket), { recursive: true });
			return files.filter((f) => f.endsWith('._S3rver_object')).map((f) => f.replace(/\._S3rver_object$/, ''));
		},
		close: async () => {
			store.close();
			await fake.close();
			await rm(dir, { recursive: true, force: true });
		}
	};
}
