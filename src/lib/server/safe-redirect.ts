/** A same-site path to return to after sign-in, or undefined; refuses `//host` and absolute URLs (open redirect). */
export function safeRedirect(target: string | null | undefined): string | undefined {
	if (!target || !target.startsWith('/') || target.startsWith('//') || target.startsWith('/\\')) return undefined;
	if (target.startsWith('/signin') || target.startsWith('/auth')) return undefined;
	return target;
}
