/**
 * Benchstamp design tokens as plain data: the one source for tailwind.config.ts (which turns the colours into
 * CSS custom properties per theme) and for contrast.test.ts (which proves the pairs readable).
 * Plain TypeScript, no imports: it loads under Tailwind's config loader, Vite and Vitest alike.
 */

/** Brand identity, theme-independent: "shop ink" graphite-blue and "stamp amber". Used by the logo mark. */
export const brand = {
	ink: '#14213a',
	amber: '#f2b23a'
} as const;

export const themeNames = ['light', 'dark'] as const;
export type ThemeName = (typeof themeNames)[number];

export const statusNames = ['pass', 'fail', 'warn', 'caution', 'info'] as const;
export type StatusName = (typeof statusNames)[number];

/**
 * Semantic colour names. Each becomes a Tailwind colour (`bg-surface`, `text-fg-muted`, `border-line-strong`…)
 * backed by the CSS variable `--bs-<name>`. Per status: `<s>` solid fill, `on-<s>` text on that fill,
 * `<s>-soft` tinted background, `<s>-fg` coloured text and icons on soft and on every surface.
 */
export const colorNames = [
	'surface',
	'surface-raised',
	'surface-sunken',
	'line',
	'line-strong',
	'fg',
	'fg-muted',
	'primary',
	'primary-hover',
	'on-primary',
	'accent',
	'on-accent',
	'focus',
	...statusNames.flatMap((s) => [s, `on-${s}`, `${s}-soft`, `${s}-fg`] as const)
] as const;
export type ColorName = (typeof colorNames)[number];

export type Theme = Record<ColorName, string>;

export const themes: Record<ThemeName, Theme> = {
	// Light: for bright shop lighting; warm paper page, white cards, near-black ink text.
	light: {
		surface: '#f4f2ed',
		'surface-raised': '#ffffff',
		'surface-sunken': '#e9e6df',
		line: '#c9c4b9',
		'line-strong': '#6b675e',
		fg: '#121821',
		'fg-muted': '#474e59',
		primary: '#1d3557',
		'primary-hover': '#14263f',
		'on-primary': '#ffffff',
		accent: '#f2b23a',
		'on-accent': '#121821',
		focus: '#1f56c9',
		pass: '#1c6e37',
		'on-pass': '#ffffff',
		'pass-soft': '#dcefe0',
		'pass-fg': '#13542a',
		fail: '#b02a1f',
		'on-fail': '#ffffff',
		'fail-soft': '#fbe3df',
		'fail-fg': '#8a1c14',
		warn: '#b8500a',
		'on-warn': '#ffffff',
		'warn-soft': '#fde7d3',
		'warn-fg': '#783204',
		caution: '#f2c94c',
		'on-caution': '#121821',
		'caution-soft': '#fbf0c4',
		'caution-fg': '#5a4200',
		info: '#2c5d9e',
		'on-info': '#ffffff',
		'info-soft': '#dfe9f7',
		'info-fg': '#1c467d'
	},
	// Dark: for dim bays and glare at night; graphite page, lighter raised cards, soft white text.
	dark: {
		surface: '#0e131a',
		'surface-raised': '#18202b',
		'surface-sunken': '#090d12',
		line: '#35404f',
		'line-strong': '#8794a5',
		fg: '#f1f3f6',
		'fg-muted': '#b3bdc9',
		primary: '#9cc0f2',
		'primary-hover': '#bcd5f7',
		'on-primary': '#0b1420',
		accent: '#f2b23a',
		'on-accent': '#121821',
		focus: '#ffcf5c',
		pass: '#4fbf72',
		'on-pass': '#06140b',
		'pass-soft': '#12301c',
		'pass-fg': '#86dba0',
		fail: '#f06a5f',
		'on-fail': '#1a0604',
		'fail-soft': '#3b1512',
		'fail-fg': '#ffa59c',
		warn: '#f5913a',
		'on-warn': '#1a0c02',
		'warn-soft': '#3a2211',
		'warn-fg': '#ffbd85',
		caution: '#f2c94c',
		'on-caution': '#121821',
		'caution-soft': '#342b0c',
		'caution-fg': '#f5d97a',
		info: '#6aa8ee',
		'on-info': '#041220',
		'info-soft': '#0f2642',
		'info-fg': '#9fc8f7'
	}
};

/** The CSS custom property behind a colour token. */
export const cssVar = (name: ColorName) => `--bs-${name}`;

/** Surfaces body text sits on in bench screens (each must give AAA contrast with `fg`). */
export const benchSurfaces = ['surface', 'surface-raised', 'surface-sunken'] as const satisfies readonly ColorName[];

/**
 * Type scale. `bench-*` is for the technician's tablet: nothing under 18 px; `reading` for measured values.
 * [size, line-height]
 */
export const fontSize = {
	'bench-sm': ['1.125rem', '1.6rem'],
	'bench-base': ['1.25rem', '1.75rem'],
	'bench-lg': ['1.5rem', '2rem'],
	'bench-xl': ['2rem', '2.5rem'],
	'bench-2xl': ['2.5rem', '3rem'],
	reading: ['3.5rem', '1.1'],
	'reading-lg': ['5rem', '1.05']
} as const satisfies Record<string, readonly [string, string]>;

/** Touch targets and bench spacing. Gloved fingertips need ≥ 64 CSS px and a real gap between targets. */
export const spacing = {
	target: '4rem',
	'target-lg': '5rem',
	'bench-gap': '0.75rem',
	'bench-pad': '1.5rem'
} as const;

export const radius = {
	bench: '0.75rem'
} as const;

/** Names for tailwind-merge, so `text-bench-base` is known as a size and not mistaken for a colour. */
export const tokenKeys = {
	color: [...colorNames, 'brand-ink', 'brand-amber'],
	text: Object.keys(fontSize),
	spacing: Object.keys(spacing),
	radius: Object.keys(radius)
};
