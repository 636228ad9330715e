/** States of a work order, in the order a job normally passes through them. */
export const JOB_STATES = [
	'received',
	'in_work',
	'on_hold',
	'awaiting_parts',
	'awaiting_review',
	'released',
	'scrapped'
] as const;
export type JobState = (typeof JOB_STATES)[number];

export const JOB_STATE_LABELS: Record<JobState, string> = {
	received: 'Received',
	in_work: 'In work',
	on_hold: 'On hold',
	awaiting_parts: 'Awaiting parts',
	awaiting_review: 'Awaiting review',
	released: 'Released',
	scrapped: 'Scrapped'
};

/** Allowed moves. Released and scrapped are final; review can send a job back to work. */
export const JOB_TRANSITIONS: Record<JobState, readonly JobState[]> = {
	received: ['in_work', 'on_hold', 'scrapped'],
	in_work: ['on_hold', 'awaiting_parts', 'awaiting_review', 'scrapped'],
	on_hold: ['in_work', 'scrapped'],
	awaiting_parts: ['in_work', 'on_hold', 'scrapped'],
	awaiting_review: ['released', 'in_work', 'scrapped'],
	released: [],
	scrapped: []
};

export const canMove = (from: JobState, to: JobState) => JOB_TRANSITIONS[from].includes(to);

/** Only a quality lead (or an administrator) releases a unit. */
export const RELEASE_ROLES = ['quality', 'admin'] as const;
