// Loaded by src/app.css through `@config`. Every value comes from src/lib/design/tokens.ts so the CSS, the
// contrast test and tailwind-merge (src/lib/utils/cn.ts) can never disagree.
import type { Config } from 'tailwindcss';
import plugin from 'tailwindcss/plugin';
import { brand, colorNames, cssVar, fontSize, radius, spacing, themes, type Theme } from './src/lib/design/tokens';

const vars = (theme: Theme) => Object.fromEntries(colorNames.map((name) => [cssVar(name), theme[name]]));

// Light by default; dark when <html data-theme="dark">, or when the system prefers dark and no explicit
// light choice was made (ThemeToggle removes the attribute for "system").
const themeVariables = plugin(({ addBase }) => {
	addBase({
		':root': { ...vars(themes.light), 'color-scheme': 'light' },
		':root[data-theme="dark"]': { ...vars(themes.dark), 'color-scheme': 'dark' },
		'@media (prefers-color-scheme: dark)': {
			':root:not([data-theme="light"])': { ...vars(themes.dark), 'color-scheme': 'dark' }
		}
	});
});

export default {
	content: ['./src/**/*.{html,svelte,ts}'],
	theme: {
		// Replaces Tailwind's palette on purpose: only semantic tokens, so every colour has a dark twin.
		colors: {
			transparent: 'transparent',
			current: 'currentColor',
			inherit: 'inherit',
			...Object.fromEntries(colorNames.map((name) => [name, `var(${cssVar(name)})`])),
			'brand-ink': brand.ink,
			'brand-amber': brand.amber
		},
		extend: {
			fontFamily: {
				sans: ['"Atkinson Hyperlegible"', 'system-ui', 'sans-serif'],
				mono: ['"JetBrains Mono Variable"', 'ui-monospace', 'monospace']
			},
			fontSize: Object.fromEntries(Object.entries(fontSize).map(([k, [size, lh]]) => [k, [size, { lineHeight: lh }]])),
			spacing,
			minHeight: spacing,
			minWidth: spacing,
			borderRadius: radius
		}
	},
	plugins: [themeVariables]
} satisfies Config;
