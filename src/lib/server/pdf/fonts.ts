/**
 * The PDF's fonts, embedded in the server bundle as .woff (pdfkit renders .woff2 glyphs blank), so rendering needs
 * neither the network nor the @fontsource package at run time. Atkinson Hyperlegible (OFL-1.1), latin subset: it has
 * µ, ±, ° and · (U+00B5, U+00B1, U+00B0, U+00B7), which readings and limits use.
 */
import regularUrl from '@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-400-normal.woff?inline';
import boldUrl from '@fontsource/atkinson-hyperlegible/files/atkinson-hyperlegible-latin-700-normal.woff?inline';

const fromDataUrl = (url: string): Buffer => Buffer.from(url.slice(url.indexOf(',') + 1), 'base64');

let cache: { regular: Buffer; bold: Buffer } | undefined;

/** The regular and bold faces as bytes, decoded once. */
export function pdfFonts(): { regular: Buffer; bold: Buffer } {
	cache ??= { regular: fromDataUrl(regularUrl), bold: fromDataUrl(boldUrl) };
	return cache;
}
