import { AdminLog } from './admin-log.entity';
import { Calibration } from './calibration.entity';
import { CustomerRecordLink } from './customer-record-link.entity';
import { Device } from './device.entity';
import { HeldRecord, HeldRecordResolution } from './held-record.entity';
import { Job } from './job.entity';
import { LedgerAnchor } from './ledger-anchor.entity';
import { LedgerRecord } from './ledger-record.entity';
import { PinLock } from './pin-lock.entity';
import { JobPhoto } from './job-photo.entity';
import { JobStateChange } from './job-state-change.entity';
import { OneTimeToken } from './one-time-token.entity';
import { Part } from './part.entity';
import { PartLot } from './part-lot.entity';
import { Procedure } from './procedure.entity';
import { ProcedureDraft } from './procedure-draft.entity';
import { ProcedureVersion } from './procedure-version.entity';
import { Qualification } from './qualification.entity';
import { RateLimit } from './rate-limit.entity';
import { Run } from './run.entity';
import { RunSignerDay, RunSummary } from './run-summary.entity';
import { StoredImage } from './stored-image.entity';
import { Tool } from './tool.entity';
import { User } from './user.entity';
import { UserSession } from './user-session.entity';

export { AdminLog, OneTimeToken, RateLimit, User, UserSession };
export type { IUserSession } from './user-session.entity';
export type { IAdminLog } from './admin-log.entity';
export type { IOneTimeToken, TokenPurpose } from './one-time-token.entity';
export type { IUser, Role } from './user.entity';
export { ROLES } from './user.entity';
export { Procedure, ProcedureDraft, ProcedureVersion };
export type { IProcedure } from './procedure.entity';
export type { IProcedureDraft } from './procedure-draft.entity';
export type { IProcedureVersion } from './procedure-version.entity';
export { StoredImage, IMAGE_PURPOSES } from './stored-image.entity';
export type { IStoredImage, ImagePurpose } from './stored-image.entity';
export { Job, JobStateChange, JobPhoto, Tool, Calibration, Qualification, Part, PartLot };
export type { IJob } from './job.entity';
export type { IJobStateChange } from './job-state-change.entity';
export type { IJobPhoto } from './job-photo.entity';
export type { ITool } from './tool.entity';
export type { ICalibration } from './calibration.entity';
export type { IQualification } from './qualification.entity';
export type { IPart } from './part.entity';
export type { IPartLot } from './part-lot.entity';
export { Run, LedgerRecord, PinLock, RunSummary, RunSignerDay };
export type { IRunSummary, IRunSignerDay } from './run-summary.entity';
export { RUN_STATES } from './run.entity';
export type { IRun, RunState } from './run.entity';
export type { ILedgerRecord } from './ledger-record.entity';
export type { IPinLock } from './pin-lock.entity';
export { LedgerAnchor };
export { ANCHOR_PLACES } from './ledger-anchor.entity';
export type { ILedgerAnchor, AnchorPlace } from './ledger-anchor.entity';
export { CustomerRecordLink };
export type { ICustomerRecordLink } from './customer-record-link.entity';
export { Device, HeldRecord, HeldRecordResolution };
export { HOLD_REASONS, HOLD_OUTCOMES } from './held-record.entity';
export type { IDevice } from './device.entity';
export type { IHeldRecord, IHeldRecordResolution, HoldReason, HoldOutcome } from './held-record.entity';

/** Explicit list: MikroORM never scans folders here. */
export const entities = [
	User,
	UserSession,
	OneTimeToken,
	AdminLog,
	RateLimit,
	Procedure,
	ProcedureVersion,
	ProcedureDraft,
	StoredImage,
	Job,
	JobStateChange,
	JobPhoto,
	Tool,
	Calibration,
	Qualification,
	Part,
	PartLot,
	Run,
	RunSummary,
	RunSignerDay,
	LedgerRecord,
	PinLock,
	LedgerAnchor,
	CustomerRecordLink,
	Device,
	HeldRecord,
	HeldRecordResolution
];
