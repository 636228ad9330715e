import { z } from 'zod';

/** Roles a person may hold; several at once. */
export const ROLE_NAMES = ['technician', 'lead', 'quality', 'admin'] as const;
export type RoleName = (typeof ROLE_NAMES)[number];

export const ROLE_LABELS: Record<RoleName, string> = {
	technician: 'Technician',
	lead: 'Lead technician',
	quality: 'Quality lead',
	admin: 'Administrator'
};

const email = z.string().trim().toLowerCase().email('Enter an e-mail address such as name@shop.example.').max(320);
// NIST SP 800-63B §5.1.1.2: at least 8 characters, allow at least 64.
const password = z.string().min(8, 'Use at least 8 characters.').max(128, 'Use at most 128 characters.');
const pin = z.string().regex(/^\d{6,8}$/, 'A bench PIN is 6 to 8 digits.');

export const signInSchema = z.object({
	email: z.string().trim().min(1, 'Enter your e-mail address.').max(320),
	password: z.string().min(1, 'Enter your password.').max(128),
	redirectTo: z.string().default('/')
});

export const inviteSchema = z.object({
	email,
	name: z.string().trim().min(2, 'Enter the person’s name as it should appear on signed records.').max(120),
	roles: z.array(z.enum(ROLE_NAMES)).min(1, 'Choose at least one role.')
});

export const rolesSchema = z.object({
	roles: z.array(z.enum(ROLE_NAMES)).min(1, 'Choose at least one role.')
});

export const setPasswordAndPinSchema = z
	.object({ password, passwordAgain: z.string(), pin, pinAgain: z.string() })
	.refine((v) => v.password === v.passwordAgain, { path: ['passwordAgain'], message: 'The two passwords differ.' })
	.refine((v) => v.pin === v.pinAgain, { path: ['pinAgain'], message: 'The two PINs differ.' });

export const newPasswordSchema = z
	.object({ password, passwordAgain: z.string() })
	.refine((v) => v.password === v.passwordAgain, { path: ['passwordAgain'], message: 'The two passwords differ.' });

export const newPinSchema = z
	.object({ pin, pinAgain: z.string() })
	.refine((v) => v.pin === v.pinAgain, { path: ['pinAgain'], message: 'The two PINs differ.' });

export const pinSchema = pin;

/** Where a person lands after signing in: the home of their first role in this order. */
export function homeFor(roles: readonly string[]): string {
	if (roles.includes('technician')) return '/bench';
	if (roles.includes('lead')) return '/library';
	if (roles.includes('quality')) return '/quality';
	if (roles.includes('admin')) return '/admin/people';
	return '/account';
}

export const changePinSchema = z
	.object({ currentPassword: z.string().min(1, 'Enter your current password.').max(128), pin, pinAgain: z.string() })
	.refine((v) => v.pin === v.pinAgain, { path: ['pinAgain'], message: 'The two PINs differ.' });
