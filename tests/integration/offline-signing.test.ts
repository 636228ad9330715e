import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IUser } from '../../src/lib/server/db/entities';
import * as held from '../../src/lib/server/repositories/held-records';
import * as ledger from '../../src/lib/server/repositories/ledger';
import { submitBatchSchema } from '../../src/lib/server/services/runs.schema';
import { submitRecords } from '../../src/lib/server/services/submit.service';
import { OFFLINE_GRANT_MS } from '../../src/lib/signing/offline-grant';
import { makeTablet, type TestTablet } from '../factories/devices';
import { boreAttempt, makeRun, PIN, record } from '../factories/runs';
import { withClient } from '../../scripts/lib/postgres';
import { testDbUrls } from './db-urls';
import { migratedAppOrm } from './support/orm';

const viewer = (u: IUser) => ({ id: u.id, name: u.name, roles: u.roles });

describe('signing with the network down: grants issued online, offline records accepted only while they hold', () => {
	let orm: MikroORM;
	beforeAll(async () => {
		orm = await migratedAppOrm();
	});
	afterAll(() => orm.close(true));

	async function submit(actor: IUser, runId: string, records: unknown[], pins: Record<string, string> = {}) {
		const r = await submitRecords(orm.em.fork(), viewer(actor), runId, submitBatchSchema.parse({ records, pins }));
		if (!r.ok) throw new Error(r.message);
		return r.value.answers;
	}

	/** Signs a bore attempt online with the PIN on `tablet`, and answers the grant the server hands back. */
	async function online(tech: IUser, runId: string, tablet: TestTablet) {
		const sent = await tablet.sign({ ...record(runId, tech, 'attempt', boreAttempt('22.010')), signedAt: Date.now() });
		const [answer] = await submit(tech, runId, [sent], { [tech.id]: PIN });
		expect(answer.status).toBe('accepted');
		return answer.offlineGrant!;
	}

	const offlineRecord = (tablet: TestTablet, runId: string, tech: IUser, grant: string | undefined, signedAt: number) =>
		tablet.sign({
			...record(runId, tech, 'attempt', boreAttempt('22.011')),
			signedAt,
			signedOffline: true,
			...(grant !== undefined && { offlineGrant: grant })
		});

	it('hands an enrolled tablet a grant when it checks the PIN online, and none to an unenrolled browser', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const grant = await online(tech, runId, tablet);
		expect(grant.grant).toMatch(/^[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/);
		expect(Math.abs(grant.issuedAt - Date.now())).toBeLessThan(60_000);
		// The credential epoch the tablet compares before it skips re-deriving its PIN verifier: the same while the
		// account's PIN, roles and password stay the same.
		expect(grant.epoch).toMatch(/^v\d+\.p\d+$/);
		expect((await online(tech, runId, tablet)).epoch).toBe(grant.epoch);
		const [plain] = await submit(tech, runId, [record(runId, tech, 'attempt', boreAttempt('22.010'))], {
			[tech.id]: PIN
		});
		expect(plain.status).toBe('accepted');
		expect(plain.offlineGrant).toBeUndefined();
	});

	it('accepts a record signed offline with the grant and no PIN, flagged as signed offline', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const grant = await online(tech, runId, tablet);
		const sent = await offlineRecord(tablet, runId, tech, grant.grant, grant.issuedAt + 3_600_000);
		const [answer] = await submit(tech, runId, [sent]);
		expect(answer, answer.reason).toMatchObject({ status: 'accepted' });
		expect((await ledger.findById(orm.em.fork(), sent.id))?.signedOffline).toBe(true);
	});

	it('refuses and holds an offline record with no grant, a forged grant, or one older than 12 hours', async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const grant = await online(tech, runId, tablet);
		const [body, mac] = grant.grant.split('.');
		const forged = `${body}.${mac.slice(0, -2)}${mac.endsWith('AA') ? 'BB' : 'AA'}`;
		const cases: [string | undefined, number, RegExp][] = [
			[undefined, grant.issuedAt + 1000, /must carry the offline signing permit/],
			[forged, grant.issuedAt + 1000, /not issued by this server/],
			[grant.grant, grant.issuedAt + OFFLINE_GRANT_MS + 60_000, /more than 12 hours/]
		];
		for (const [g, at, why] of cases) {
			const sent = await offlineRecord(tablet, runId, tech, g, at);
			const [answer] = await submit(tech, runId, [sent]);
			expect(answer.status).toBe('refused');
			expect(answer.reason).toMatch(why);
			expect(answer.reason).toMatch(/held for the quality lead/);
			expect(await ledger.findById(orm.em.fork(), sent.id)).toBeNull();
		}
		expect(await held.countForRun(orm.em.fork(), runId)).toBe(3);
	});

	it("voids the grant when the signer's PIN changes, and refuses another signer's grant", async () => {
		const { lead, tech, runId } = await makeRun(orm.em.fork());
		const tablet = await makeTablet(orm.em.fork(), lead);
		const grant = await online(tech, runId, tablet);
		const asLead = await offlineRecord(tablet, runId, lead, grant.grant, grant.issuedAt + 1000);
		const [other] = await submit(lead, runId, [asLead]);
		expect(other.reason).toMatch(/not .*'s for this tablet/);
		await withClient(testDbUrls().ownerUrl, (c) =>
			c.query(`update app_user set pin_changed_at = now() + interval '1 second' where id = $1`, [tech.id])
		);
		const sent = await offlineRecord(tablet, runId, tech, grant.grant, grant.issuedAt + 2000);
		const [answer] = await submit(tech, runId, [sent]);
		expect(answer.status).toBe('refused');
		expect(answer.reason).toMatch(/PIN, roles or password changed/);
		// A new grant after the PIN change names another epoch, so the tablet derives a new verifier.
		expect((await online(tech, runId, tablet)).epoch).not.toBe(grant.epoch);
	});
});
