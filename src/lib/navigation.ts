import type { RoleName } from './accounts/schema';

export interface NavItem {
	href: string;
	label: string;
	icon?: string;
	roles: readonly RoleName[];
	demoOnly?: boolean;
}

/** Every destination in the app bar. The server enforces access; this only decides what each person sees. */
export const NAV: readonly NavItem[] = [
	{ href: '/bench', label: 'Bench', icon: 'wrench', roles: ['technician', 'lead'] },
	{ href: '/library', label: 'Procedures', icon: 'procedure', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ href: '/jobs', label: 'Jobs', icon: 'run', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ href: '/tools', label: 'Tools', icon: 'wrench', roles: ['technician', 'lead', 'quality', 'admin'] },
	{ href: '/parts', label: 'Parts', icon: 'plus-minus', roles: ['lead', 'quality', 'admin'] },
	{ href: '/qualifications', label: 'Training', icon: 'check', roles: ['lead', 'quality', 'admin'] },
	{ href: '/quality', label: 'Quality', icon: 'audit', roles: ['quality'] },
	{ href: '/quality/held', label: 'Held records', icon: 'pending', roles: ['quality'] },
	{ href: '/bench/devices', label: 'Tablets', icon: 'lock', roles: ['lead'] },
	{ href: '/admin/people', label: 'People', icon: 'user', roles: ['admin'] },
	{ href: '/admin/log', label: 'Admin log', icon: 'lock', roles: ['admin'] },
	{ href: '/dev/outbox', label: 'Outbox', icon: 'info', roles: ['admin'], demoOnly: true },
	{ href: '/account', label: 'My account', icon: 'user', roles: ['technician', 'lead', 'quality', 'admin'] }
];

export function navFor(roles: readonly string[], demo: boolean): { href: string; label: string; icon?: string }[] {
	return NAV.filter((n) => (!n.demoOnly || demo) && n.roles.some((r) => roles.includes(r))).map(
		({ href, label, icon }) => ({ href, label, icon })
	);
}
