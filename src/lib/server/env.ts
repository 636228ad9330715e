import { z } from 'zod';

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
	FAKE_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(2526)
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
	if (parsed.data.BENCHSTAMP_MODE === 'production' && !parsed.data.SMTP_URL) {
		throw new Error(
			'Benchstamp cannot start; fix these settings:\n  SMTP_URL: required in production (your mail relay)'
		);
	}
	cached = parsed.data;
	return cached;
}

export const isDemo = () => env().BENCHSTAMP_MODE === 'demo';
