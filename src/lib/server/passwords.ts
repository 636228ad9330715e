import { hash, verify } from '@node-rs/argon2';

// OWASP Password Storage Cheat Sheet (2023) argon2id minimum: m = 19 MiB, t = 2, p = 1.
const OPTIONS = {
	algorithm: 2 /* Algorithm.Argon2id; a const enum cannot be imported under verbatimModuleSyntax */,
	memoryCost: 19456,
	timeCost: 2,
	parallelism: 1
} as const;

/** argon2id hash of a password or PIN, as a PHC string. */
export function hashSecret(secret: string): Promise<string> {
	return hash(secret, OPTIONS);
}

/** Constant-time check of a secret against its stored hash; false for a missing or malformed hash. */
export async function verifySecret(stored: string | null | undefined, secret: string): Promise<boolean> {
	if (!stored) {
		// Spend the same time as a real check so timing does not reveal whether an account exists.
		await hash(secret, OPTIONS);
		return false;
	}
	try {
		return await verify(stored, secret);
	} catch {
		return false;
	}
}
