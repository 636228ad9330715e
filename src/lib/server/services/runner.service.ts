/**
 * What the bench runner's pages need around F's run service: the choices for starting a run on a job, the job's
 * runs, and the runner screen's view (pinned model, usable tools, who may sign). Plain objects only.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RoleName } from '$lib/accounts/schema';
import type { Procedure } from '../../procedure/model';
import { renderStep } from '../../procedure/render';
import type { IProcedure, IProcedureVersion, IUser } from '../db/entities';
import * as procedures from '../repositories/procedures';
import * as runs from '../repositories/runs';
import { findUsable } from '../repositories/tools';
import * as users from '../repositories/users';
import { toolChoices, type ToolChoice } from './run-tool-choices';
import { versionNotice, type VersionNotice } from './run-versions.service';
import { getRun, maySee, type Result, type RunView, type Viewer } from './runs.service';

/** Roles a signer may sign a step as, in order of preference. */
const SIGNING_ROLES: RoleName[] = ['technician', 'lead'];
/** Roles a second person may verify a critical step as (the submit service's rule), in order of preference. */
const VERIFYING_ROLES: RoleName[] = ['quality', 'lead'];

export interface VersionChoice {
	id: string;
	label: string;
	contentHash: string;
}
export interface RunSummary {
	id: string;
	state: string;
	title: string;
	versionNumber: number;
	assignedTo: string;
	createdAt: string;
	/** A short word about a newer version: waiting for a lead's decision, or moved (null otherwise). */
	versionNote: string | null;
}

async function activeSigners(em: EntityManager, roles: RoleName[] = SIGNING_ROLES) {
	return (await users.listAll(em))
		.filter((u) => u.active && u.roles.some((r) => roles.includes(r)))
		.map((u) => ({ id: u.id, name: u.name, role: roles.find((r) => u.roles.includes(r))! }))
		.sort((a, b) => a.name.localeCompare(b.name));
}

/** Published, not retired versions (newest per procedure first) and the people a run may be assigned to. */
export async function startChoices(
	em: EntityManager
): Promise<{ versions: VersionChoice[]; assignees: { id: string; name: string }[] }> {
	const all = await procedures.listAll(em);
	const titles = new Map(all.map((p) => [p.id, p.title]));
	const versions = (await procedures.listVersionsLight(em))
		.filter((v) => !v.retiredAt)
		.map((v) => {
			const pid = (v.procedure as unknown as IProcedure).id;
			return { id: v.id, label: `${titles.get(pid) ?? 'Procedure'} · version ${v.number}`, contentHash: v.contentHash };
		})
		.sort((a, b) => a.label.localeCompare(b.label));
	const assignees = (await activeSigners(em)).map(({ id, name }) => ({ id, name }));
	return { versions, assignees };
}

function noteOf(n: VersionNotice | null): string | null {
	if (!n) return null;
	if (n.decision?.decision === 'move') return `moved to version ${n.decision.toVersion}`;
	if (!n.newer) return null;
	return n.decision
		? `continues on version ${n.runVersion} (version ${n.newer.number} published)`
		: `version ${n.newer.number} published: a lead decides whether this run continues or moves`;
}

/** The job's runs the viewer may see (technicians: their own). */
export async function runsOfJob(em: EntityManager, viewer: Viewer, jobId: string): Promise<RunSummary[]> {
	const out: RunSummary[] = [];
	for (const r of await runs.listForJob(em, jobId)) {
		if (!(await maySee(em, viewer, r))) continue;
		const v = r.procedureVersion as unknown as IProcedureVersion;
		out.push({
			id: r.id,
			state: r.state,
			title: (v.procedure as unknown as IProcedure).title,
			versionNumber: v.number,
			assignedTo: (r.assignedTo as unknown as IUser).name,
			createdAt: r.createdAt.toISOString(),
			versionNote: noteOf(await versionNotice(em, viewer, r))
		});
	}
	return out;
}

export interface RunnerView {
	run: RunView;
	title: string;
	family: string;
	model: Procedure;
	/** Sanitised step HTML by step index (the engine's `renderStep`). */
	stepHtml: string[];
	tools: { id: string; assetTag: string; kind: string; description: string }[];
	/** Per step that lists tools: every active tool, usable first, the others with the reason in words. */
	toolChoices: Record<number, ToolChoice[]>;
	signers: { id: string; name: string; role: RoleName }[];
	/** Who may verify a critical step (lead or quality); the server refuses whoever did the step. */
	verifiers: { id: string; name: string; role: RoleName }[];
	/** A newer published version and the lead's decision about it (null when there is none). */
	versionNotice: VersionNotice | null;
}

/** The runner screen for a run the viewer may see; otherwise "not found". */
export async function runnerView(em: EntityManager, viewer: Viewer, runId: string): Promise<Result<RunnerView>> {
	const got = await getRun(em, viewer, runId);
	if (!got.ok) return got;
	const version = await runs.findVersion(em, got.value.procedureVersionId);
	if (!version) return { ok: false, status: 404, message: 'No such run.' };
	const model = version.model as Procedure;
	const row = (await runs.findById(em, runId))!;
	const tools = (await findUsable(em)).map((t) => ({
		id: t.id,
		assetTag: t.assetTag,
		kind: t.kind,
		description: t.description
	}));
	return {
		ok: true,
		value: {
			run: got.value,
			title: model.meta.title,
			family: model.meta.family,
			model,
			stepHtml: model.steps.map((s) => renderStep(s)),
			tools,
			toolChoices: await toolChoices(em, model),
			signers: await activeSigners(em),
			verifiers: await activeSigners(em, VERIFYING_ROLES),
			versionNotice: await versionNotice(em, viewer, row)
		}
	};
}
