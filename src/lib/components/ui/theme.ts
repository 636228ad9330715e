/** Theme choice shared by ThemeToggle and (if the lead wires it) hooks.server.ts, to avoid a flash on load. */

export const themeChoices = ['light', 'dark', 'system'] as const;
export type ThemeChoice = (typeof themeChoices)[number];

export const THEME_STORAGE_KEY = 'benchstamp-theme';
/** Mirrors the choice so the server can render `data-theme` on <html> before any script runs. */
export const THEME_COOKIE = 'benchstamp-theme';

export function parseThemeChoice(raw: string | null | undefined): ThemeChoice {
	return themeChoices.includes(raw as ThemeChoice) ? (raw as ThemeChoice) : 'system';
}

/** Browser only: sets or removes `data-theme` on <html> and remembers the choice. */
export function applyThemeChoice(choice: ThemeChoice): void {
	const root = document.documentElement;
	if (choice === 'system') root.removeAttribute('data-theme');
	else root.setAttribute('data-theme', choice);
	try {
		localStorage.setItem(THEME_STORAGE_KEY, choice);
	} catch {
		// Private mode or storage disabled: the choice still applies to this page.
	}
	document.cookie = `${THEME_COOKIE}=${choice}; Path=/; Max-Age=31536000; SameSite=Lax`;
}
