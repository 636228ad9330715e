import { describe, expect, it } from 'vitest';
import { contrastRatio, parseHex, relativeLuminance } from './contrast';
import { benchSurfaces, brand, colorNames, statusNames, themeNames, themes } from './tokens';

// Thresholds: WCAG 2.2 SC 1.4.6 Contrast (Enhanced, AAA) 7:1 for body text; SC 1.4.3 (AA) 4.5:1 for other
// text; SC 1.4.11 Non-text Contrast 3:1 for focus rings and control borders.
const AAA = 7;
const AA = 4.5;
const NON_TEXT = 3;

describe('contrast formula (WCAG 2.2 definitions of relative luminance and contrast ratio)', () => {
	it.each([
		// Source: WCAG 2.2 "contrast ratio" note — ratios range from 1:1 to 21:1 (black on white).
		['#000000', '#ffffff', 21, 10],
		['#ffffff', '#000000', 21, 10],
		['#777777', '#777777', 1, 10],
		// Source: WebAIM contrast checker, #767676 on white = 4.54:1 (the lightest grey passing AA).
		['#767676', '#ffffff', 4.54, 2],
		// Source: WebAIM contrast checker, #595959 on white = 7.0:1 (the lightest grey passing AAA).
		['#595959', '#ffffff', 7.0, 2]
	])('%s on %s is %d:1', (a, b, expected, digits) => {
		expect(contrastRatio(a, b)).toBeCloseTo(expected, digits);
	});

	it('gives luminance 0 for black and 1 for white, and accepts #rgb', () => {
		expect(relativeLuminance('#000')).toBe(0);
		expect(relativeLuminance('#fff')).toBe(1);
		expect(parseHex('#1aF')).toEqual([0x11, 0xaa, 0xff]);
		expect(() => parseHex('red')).toThrow();
	});
});

describe.each(themeNames)('%s theme', (name) => {
	const t = themes[name];

	it('defines every token as a 6-digit hex', () => {
		for (const c of colorNames) expect(t[c], c).toMatch(/^#[0-9a-f]{6}$/);
	});

	it.each(benchSurfaces)('body text on %s ≥ 7:1 (AAA)', (surface) => {
		expect(contrastRatio(t.fg, t[surface])).toBeGreaterThanOrEqual(AAA);
	});

	it.each(benchSurfaces)('muted text on %s ≥ 4.5:1', (surface) => {
		expect(contrastRatio(t['fg-muted'], t[surface])).toBeGreaterThanOrEqual(AA);
	});

	it.each(benchSurfaces)('focus ring and control borders on %s ≥ 3:1', (surface) => {
		expect(contrastRatio(t.focus, t[surface])).toBeGreaterThanOrEqual(NON_TEXT);
		expect(contrastRatio(t['line-strong'], t[surface])).toBeGreaterThanOrEqual(NON_TEXT);
	});

	it('button labels on primary and accent fills ≥ 7:1', () => {
		expect(contrastRatio(t['on-primary'], t.primary)).toBeGreaterThanOrEqual(AAA);
		expect(contrastRatio(t['on-primary'], t['primary-hover'])).toBeGreaterThanOrEqual(AAA);
		expect(contrastRatio(t['on-accent'], t.accent)).toBeGreaterThanOrEqual(AAA);
	});

	it('primary as link text on surfaces ≥ 4.5:1', () => {
		for (const s of benchSurfaces) expect(contrastRatio(t.primary, t[s]), s).toBeGreaterThanOrEqual(AA);
	});

	describe.each(statusNames)('status %s', (status) => {
		it('label on its solid fill ≥ 4.5:1', () => {
			expect(contrastRatio(t[`on-${status}`], t[status])).toBeGreaterThanOrEqual(AA);
		});
		it('status text on its soft tint ≥ 4.5:1, body text on the tint ≥ 7:1', () => {
			expect(contrastRatio(t[`${status}-fg`], t[`${status}-soft`])).toBeGreaterThanOrEqual(AA);
			expect(contrastRatio(t.fg, t[`${status}-soft`])).toBeGreaterThanOrEqual(AAA);
		});
		it.each(benchSurfaces)('status text on %s ≥ 4.5:1', (surface) => {
			expect(contrastRatio(t[`${status}-fg`], t[surface])).toBeGreaterThanOrEqual(AA);
		});
	});
});

describe('brand mark', () => {
	it('amber on ink is legible (≥ 4.5:1) so the mark reads in both themes', () => {
		expect(contrastRatio(brand.amber, brand.ink)).toBeGreaterThanOrEqual(AA);
	});
});
