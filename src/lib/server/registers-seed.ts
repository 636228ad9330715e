// Run by scripts (outside Vite): relative imports only.
import type { EntityManager } from '@mikro-orm/postgresql';
import { Job, PartLot, Qualification, User, type IJob, type IUser } from './db/entities';
import { addDays, isoDate } from '../registers/dates';
import type { JobState } from '../registers/job-states';
import type { ToolInput } from '../registers/schema';
import * as jobs from './repositories/jobs';
import * as parts from './repositories/parts';
import * as qualifications from './repositories/qualifications';
import * as tools from './repositories/tools';

/**
 * The invented shop's registers for the demo: tools (one past due, one found out of tolerance), training where
 * Wren Okafor (tech2) lacks "transmission control adaptation", part lots matching the demo procedures' patterns,
 * and jobs in several states including a comeback on one serial. Every value is invented.
 * Idempotent: each item is keyed (asset tag, part and lot number, person and family, serial and complaint) and
 * skipped when present, so a second run changes nothing.
 */
export async function seedRegisters(em: EntityManager): Promise<{ created: number }> {
	const today = isoDate();
	const people = new Map((await em.find(User, {})).map((u) => [u.email, u] as const));
	const lead = people.get('lead@example.com');
	if (!lead) return { created: 0 };
	const actor = { id: lead.id, name: lead.name };
	let created = 0;

	// Tools: [input, days since last calibration, days until due, last in-house check found it out?]
	const toolRows: [ToolInput, number, number, boolean][] = [
		[
			tool('TW-014', 'torque_click', 'Click wrench 2–12 N·m, 1/4 in drive', '2', '12', 'N·m', '0.1', '4'),
			120,
			245,
			false
		],
		[
			tool('TW-022', 'torque_indicating', 'Dial torque wrench 5–25 N·m, 3/8 in drive', '5', '25', 'N·m', '0.5', '3'),
			345,
			20,
			false
		],
		[
			tool('TW-031', 'torque_indicating', 'Beam torque wrench 10–60 lbf·in', '10', '60', 'lbf·in', '1', '4'),
			400,
			-35,
			false
		],
		[
			tool(
				'BG-003',
				'bore_gauge',
				'Dial bore gauge 18–35 mm with 22 mm setting ring',
				'18',
				'35',
				'mm',
				'0.001',
				'0.5'
			),
			90,
			275,
			false
		],
		[tool('MC-007', 'micrometer', 'Outside micrometer 0–25 mm', '0', '25', 'mm', '0.001', '0.2'), 60, 305, true],
		[tool('CL-002', 'caliper', 'Digital caliper 0–150 mm', '0', '150', 'mm', '0.01', '0.1'), 30, 335, false],
		[tool('TH-005', 'thermometer', 'Probe thermometer −20–150 °C', '-20', '150', '°C', '0.1', '1'), 45, 320, false]
	];
	for (const [input, ago, due, failedCheck] of toolRows) {
		if (await tools.findByAssetTag(em, input.assetTag)) continue;
		const t = tools.create(em, input);
		const on = addDays(today, -ago);
		tools.addCalibration(em, t, actor, {
			kind: 'calibration',
			performedOn: on,
			certificateNo: `KLC-${on.slice(0, 4)}-${input.assetTag}`,
			asFound: 'in',
			asLeft: 'in',
			nextDueOn: addDays(today, due),
			notes: 'Invented calibration laboratory (demo).'
		});
		if (failedCheck)
			tools.addCalibration(em, t, actor, {
				kind: 'check',
				performedOn: addDays(today, -5),
				certificateNo: null,
				asFound: 'out',
				asLeft: null,
				nextDueOn: null,
				notes: 'Dropped on the bench; reads 0.006 mm high on the 10 mm gauge block. Sent for recalibration.'
			});
		created++;
	}

	// Training. Families as the demo procedures name them (front matter `family`, step `qualification`).
	const KTX7 = 'KTX-7 (invented seven-speed dual-clutch transaxle)';
	const training: [string, string, number, number | null][] = [
		['tech@example.com', KTX7, 400, null],
		['tech@example.com', 'valve-body rebuild', 380, 350],
		['tech@example.com', 'transmission control adaptation', 200, 530],
		['tech2@example.com', KTX7, 150, null],
		['tech2@example.com', 'valve-body rebuild', 120, 610],
		['lead@example.com', KTX7, 900, null],
		['lead@example.com', 'valve-body rebuild', 900, null],
		['lead@example.com', 'transmission control adaptation', 700, null]
	];
	for (const [email, family, ago, expiresIn] of training) {
		const person = people.get(email);
		if (!person) continue;
		if (await em.count(Qualification, { user: person.id, familyKey: qualifications.familyKey(family) })) continue;
		qualifications.create(em, person, actor, {
			family,
			trainedBy: email === 'lead@example.com' ? 'Sam Adeyemi' : lead.name,
			trainedOn: addDays(today, -ago),
			expiresOn: expiresIn === null ? null : addDays(today, expiresIn),
			notes: 'Demo training record (invented).'
		});
		created++;
	}

	// Parts and lots, numbered to match the demo procedures' patterns (all invented).
	const partRows: [
		string,
		string,
		'filter' | 'gasket' | 'sensor' | 'fluid',
		'ea' | 'L',
		[string, boolean, string, number][]
	][] = [
		[
			'KL-7710-01A',
			'Suction filter, KTX-7 (invented)',
			'filter',
			'ea',
			[
				['L26-0412', false, '24', 40],
				['L26-0587', false, '24', 6]
			]
		],
		['KL-7720-015', 'Pressure filter cartridge, KTX-7 (invented)', 'filter', 'ea', [['PF-2609', false, '30', 25]]],
		['KL-7730-02B', 'Oil pan gasket, KTX-7 (invented)', 'gasket', 'ea', [['G-26-118', false, '50', 33]]],
		[
			'KL-4410-03C',
			'Line-pressure sensor, KTX-7 (invented)',
			'sensor',
			'ea',
			[
				['PS26110451', true, '1', 12],
				['PS26110452', true, '1', 12]
			]
		],
		[
			'KL-9100-DCF7',
			'KLW DCF-7 dual-clutch fluid, 20 L drum (invented)',
			'fluid',
			'L',
			[
				['FL-2611-AB', false, '20', 18],
				['FL-2611-AC', false, '20', 3]
			]
		]
	];
	for (const [partNumber, description, category, unit, lots] of partRows) {
		let part = await parts.findByPartNumber(em, partNumber);
		if (!part) {
			part = parts.createPart(em, { partNumber, description, category, unit });
			created++;
		}
		for (const [lotNumber, serialised, quantity, ago] of lots) {
			if (await em.count(PartLot, { part: part.id, lotNumber })) continue;
			parts.createLot(em, part, actor, {
				lotNumber,
				serialised,
				quantity,
				receivedOn: addDays(today, -ago),
				supplier: 'Harrow Vale Drivetrain Supply (invented)'
			});
			created++;
		}
	}
	await em.flush();

	// Jobs. The second one is a comeback on the first one's serial.
	const jobRows: {
		customer: string;
		email: string;
		phone: string;
		model: string;
		serial: string;
		mileage: number;
		complaint: string;
		codes: string[];
		ago: number;
		path: JobState[];
	}[] = [
		{
			customer: 'Marta Quill',
			email: 'marta.quill@example.com',
			phone: '+1 555 0141',
			model: 'Corvane Estate 2.0 (invented)',
			serial: 'KTX7-0419-22871',
			mileage: 112_400,
			complaint: 'Shudder when pulling away in first and reverse.',
			codes: ['P17BF'],
			ago: 120,
			path: ['in_work', 'awaiting_review', 'released']
		},
		{
			customer: 'Marta Quill',
			email: 'marta.quill@example.com',
			phone: '+1 555 0141',
			model: 'Corvane Estate 2.0 (invented)',
			serial: 'KTX7-0419-22871',
			mileage: 118_950,
			complaint: 'The shudder is back, worse when warm.',
			codes: ['P17BF', 'P0841'],
			ago: 9,
			path: ['in_work']
		},
		{
			customer: 'Dario Fenwick',
			email: 'dario@example.net',
			phone: '+1 555 0178',
			model: 'Halden Sport 1.8 (invented)',
			serial: 'KTX7-0522-30114',
			mileage: 64_020,
			complaint: 'No drive after a cold start; selector flashes.',
			codes: ['P0562', 'P1740'],
			ago: 6,
			path: ['in_work', 'awaiting_parts']
		},
		{
			customer: 'Ines Thorley',
			email: '',
			phone: '+1 555 0102',
			model: 'Corvane City 1.4 (invented)',
			serial: 'KTX7-0601-11802',
			mileage: 38_700,
			complaint: 'Harsh 2–3 upshift.',
			codes: [],
			ago: 1,
			path: []
		},
		{
			customer: 'Keld Arrowsmith',
			email: 'keld.a@example.org',
			phone: '',
			model: 'Halden Tourer 2.0 (invented)',
			serial: 'KTX7-0311-09955',
			mileage: 151_300,
			complaint: 'Fluid leak at the pan; slipping in fourth.',
			codes: ['P0733'],
			ago: 14,
			path: ['in_work', 'awaiting_review']
		},
		{
			customer: 'Noor Pellham',
			email: 'noor.p@example.com',
			phone: '+1 555 0163',
			model: 'Corvane Estate 2.0 (invented)',
			serial: 'KTX7-0208-44120',
			mileage: 240_100,
			complaint: 'Grinding from the unit; metal on the magnet.',
			codes: ['P17BF', 'P0715'],
			ago: 30,
			path: ['in_work', 'scrapped']
		}
	];
	const reasons: Record<JobState, string> = {
		received: 'Received at intake.',
		in_work: 'On the bench.',
		on_hold: 'Waiting for the customer’s go-ahead.',
		awaiting_parts: 'Line-pressure sensor on order.',
		awaiting_review: 'Work done; ready for the quality lead.',
		released: 'Audited and released.',
		scrapped: 'Case cracked behind the bell housing; customer agreed to scrap.'
	};
	const quality = people.get('quality@example.com');
	for (const row of jobRows) {
		if (await em.count(Job, { serialKey: jobs.serialKey(row.serial), complaint: row.complaint })) continue;
		const receivedOn = addDays(today, -row.ago);
		const previous = await jobs.findLatestForSerial(em, row.serial, receivedOn);
		const job: IJob = jobs.create(em, {
			jobNumber: await jobs.nextJobNumber(em),
			customerName: row.customer,
			customerEmail: row.email,
			customerPhone: row.phone,
			unitModel: row.model,
			unitSerial: row.serial,
			mileage: row.mileage,
			complaint: row.complaint,
			faultCodes: row.codes,
			receivedOn,
			intakeNotes: 'Demo job (invented customer and unit).',
			state: row.path.at(-1) ?? 'received',
			previousJob: previous,
			createdById: lead.id,
			createdByName: lead.name
		});
		let from: JobState = 'received';
		jobs.recordStateChange(em, job, actor, { from: null, to: 'received', reason: reasons.received });
		for (const to of row.path) {
			const who: IUser = to === 'released' && quality ? quality : lead;
			jobs.recordStateChange(em, job, { id: who.id, name: who.name }, { from, to, reason: reasons[to] });
			from = to;
		}
		// Flushed one by one so the comeback finds the job before it.
		await em.flush();
		created++;
	}
	return { created };
}

function tool(
	assetTag: string,
	kind: ToolInput['kind'],
	description: string,
	rangeMin: string,
	rangeMax: string,
	unit: ToolInput['unit'],
	resolution: string,
	accuracyPct: string
): ToolInput {
	return { assetTag, kind, description, rangeMin, rangeMax, unit, resolution, accuracyPct };
}
