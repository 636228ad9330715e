import { AdminLog } from './admin-log.entity';
import { OneTimeToken } from './one-time-token.entity';
import { RateLimit } from './rate-limit.entity';
import { User } from './user.entity';

export { AdminLog, OneTimeToken, RateLimit, User };
export type { IAdminLog } from './admin-log.entity';
export type { IOneTimeToken, TokenPurpose } from './one-time-token.entity';
export type { IUser, Role } from './user.entity';
export { ROLES } from './user.entity';

/** Explicit list: MikroORM never scans folders here. */
export const entities = [User, OneTimeToken, AdminLog, RateLimit];
