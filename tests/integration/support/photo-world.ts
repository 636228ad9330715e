import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll } from 'vitest';
import type { IUser } from '../../../src/lib/server/db/entities';
import { closeObjectStore, useObjectStore } from '../../../src/lib/server/storage';
import { submitAs } from '../../factories/runs';
import { migratedAppOrm } from './orm';
import { startTestS3, type TestS3 } from './s3';

/** What the run-photo tests share: an app-role ORM, the S3 fake as the process-wide store, and a submit call. */
export interface PhotoWorld {
	orm: MikroORM;
	s3: TestS3;
	/** Submits records as `actor`'s session with the actor's PIN; throws on a refused batch. */
	submit: (actor: IUser, runId: string, records: unknown[]) => ReturnType<typeof submitAs>;
}

/** Call inside a `describe`: opens the world before the block's tests and closes it after them. */
export function usePhotoWorld(): PhotoWorld {
	const world = {
		submit: (actor: IUser, runId: string, records: unknown[]) => submitAs(world.orm, actor, runId, records)
	} as PhotoWorld;
	beforeAll(async () => {
		world.orm = await migratedAppOrm();
		world.s3 = await startTestS3();
		useObjectStore(world.s3.store);
	});
	afterAll(async () => {
		closeObjectStore();
		await world.s3?.close();
		await world.orm?.close(true);
	});
	return world;
}
