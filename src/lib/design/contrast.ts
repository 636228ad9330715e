/**
 * WCAG 2.x contrast, as defined in WCAG 2.2 "relative luminance" and "contrast ratio".
 * Pure: used by the design-token test and free to use at run time (e.g. to check a user-picked colour).
 */

/** Parses `#rgb` or `#rrggbb` into 0–255 channels. Throws on anything else. */
export function parseHex(hex: string): [number, number, number] {
	const m = /^#?([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(hex.trim());
	if (!m) throw new Error(`Not a hex colour: ${hex}`);
	const h = m[1].length === 3 ? [...m[1]].map((c) => c + c).join('') : m[1];
	return [0, 2, 4].map((i) => parseInt(h.slice(i, i + 2), 16)) as [number, number, number];
}

/** sRGB channel (0–255) to linear light, with the WCAG 2.2 threshold 0.04045. */
function linear(channel: number): number {
	const c = channel / 255;
	return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}

/** Relative luminance L = 0.2126 R + 0.7152 G + 0.0722 B (0 = black, 1 = white). */
export function relativeLuminance(hex: string): number {
	const [r, g, b] = parseHex(hex).map(linear);
	return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter; from 1 to 21, order of arguments irrelevant. */
export function contrastRatio(a: string, b: string): number {
	const [l1, l2] = [relativeLuminance(a), relativeLuminance(b)].sort((x, y) => y - x);
	return (l1 + 0.05) / (l2 + 0.05);
}
