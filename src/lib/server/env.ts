import { z } from 'zod';

/** Read on its own too (run-conflicts.ts): seeds and scripts submit records without the app's whole settings. */
export const conflictPolicySchema = z
	.enum(['supersede', 'hold'], { error: 'must be supersede or hold' })
	.default('supersede');

/**
 * Every setting the server reads, validated once at start-up. Read from process.env so the same module
 * serves the app (adapter-node), the scripts and the tests; `$env` is not available outside Vite.
 */
const schema = z.object({
	BENCHSTAMP_MODE: z.enum(['production', 'demo']).default('production'),
	DATABASE_URL: z.string().regex(/^postgres(ql)?:\/\//, 'must be a postgres:// URL'),
	AUTH_SECRET: z.string().min(32, 'must be at least 32 characters (generate one with `openssl rand -base64 33`)'),
	ORIGIN: z.string().url().optional(),
	SMTP_URL: z
		.string()
		.regex(/^smtps?:\/\//, 'must be an smtp:// or smtps:// URL')
		.optional(),
	MAIL_FROM: z.string().default('Benchstamp <benchstamp@localhost>'),
	MAIL_DIR: z.string().optional(),
	FAKE_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(2526),
	// The daily digest of chain heads to quality (issue 8): on by default in production, opt-in in demo mode.
	DIGEST_TIMER: z.enum(['on', 'off']).optional(),
	DIGEST_HOUR_UTC: z.coerce.number().int().min(0).max(23).default(6),
	// Object storage (any S3-API service). Unset S3_BUCKET in demo mode: the app runs its own fake on 127.0.0.1.
	S3_ENDPOINT: z.string().url('must be a URL such as http://127.0.0.1:9000').optional(),
	S3_REGION: z.string().min(1).default('us-east-1'),
	S3_BUCKET: z
		.string()
		.regex(
			/^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/,
			'must be a bucket name (3–63 lower-case letters, digits, dots, hyphens)'
		)
		.optional(),
	S3_ACCESS_KEY_ID: z.string().min(1).optional(),
	S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
	S3_PATH_STYLE: z.enum(['true', 'false']).default('true'),
	FAKE_S3_PORT: z.coerce.number().int().min(0).max(65535).default(0),
	FAKE_S3_DIR: z.string().optional(),
	/** The same step signed on two tablets: the later sign-off supersedes (default) or is held (run-conflicts.ts). */
	CONFLICT_POLICY: conflictPolicySchema
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

/** The validated environment; throws one readable message listing every bad setting. */
export function env(): Env {
	if (cached) return cached;
	const parsed = schema.safeParse(process.env);
	if (!parsed.success) {
		const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
		throw new Error(`Benchstamp cannot start; fix these settings:\n${lines.join('\n')}`);
	}
	const missing: string[] = [];
	if (parsed.data.BENCHSTAMP_MODE === 'production' && !parsed.data.SMTP_URL)
		missing.push('  SMTP_URL: required in production (your mail relay)');
	if (parsed.data.BENCHSTAMP_MODE === 'production' && !parsed.data.S3_BUCKET)
		missing.push(
			'  S3_BUCKET: required in production (the bucket that keeps photos; S3_ENDPOINT for your own service)'
		);
	if (!parsed.data.S3_ACCESS_KEY_ID !== !parsed.data.S3_SECRET_ACCESS_KEY)
		missing.push('  S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY: give both, or neither for the default credential chain');
	if (missing.length) throw new Error(`Benchstamp cannot start; fix these settings:\n${missing.join('\n')}`);
	cached = parsed.data;
	return cached;
}

export const isDemo = () => env().BENCHSTAMP_MODE === 'demo';
