import sharp, { type Metadata } from 'sharp';

/** Largest upload accepted, checked before anything is decoded. A tablet camera's JPEG is 2–8 MB. */
export const MAX_IMAGE_BYTES = 10 * 1024 * 1024;
/** Decoded size cap against decompression bombs: 50 MP covers 48 MP phone cameras (~150 MB of RGB while decoding). */
export const MAX_INPUT_PIXELS = 50_000_000;
/** Long edge of the stored picture: sharp enough to read a part number on a tablet, small enough to load quickly. */
export const MAX_EDGE_PX = 2560;
export const JPEG_QUALITY = 85;

export const NOT_A_PHOTO = 'This file is not a photo we can read (JPEG, PNG or WebP).';
export const SVG_REFUSED =
	'SVG drawings cannot be uploaded: they can carry scripts. Export the drawing as PNG or JPEG and upload that.';
export const TOO_LARGE = `This photo is larger than ${MAX_IMAGE_BYTES / 1024 / 1024} MB. Take it at a lower resolution or shrink it first.`;
export const TOO_MANY_PIXELS = `This photo has more than ${MAX_INPUT_PIXELS / 1_000_000} megapixels. Shrink it first.`;
export const DAMAGED = 'This photo could not be read: the file is damaged or incomplete. Take or export it again.';
export const HEIC_REFUSED = 'HEIC photos cannot be read here. Set the camera to JPEG, or upload a JPEG, PNG or WebP.';
export const EMPTY = 'Choose a photo to upload.';

export type ImageRefusal = { ok: false; reason: 'empty' | 'too_large' | 'unsupported' | 'damaged'; message: string };
export interface ProcessedImage {
	ok: true;
	bytes: Uint8Array;
	contentType: 'image/jpeg';
	width: number;
	height: number;
	/** The format the upload turned out to be, from its content. */
	sourceFormat: SniffedFormat;
}

export type SniffedFormat = 'jpeg' | 'png' | 'webp' | 'avif' | 'heic' | 'svg' | 'unknown';

const ascii = (b: Uint8Array, from: number, to: number) => String.fromCharCode(...b.subarray(from, to));

/**
 * What the bytes are, from their signature alone — never the file name or the declared type. Only the formats we
 * accept are then handed to the decoder, so libvips never parses SVG, PDF, TIFF or anything else it could read.
 */
export function sniffFormat(b: Uint8Array): SniffedFormat {
	if (b.length >= 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff) return 'jpeg';
	if (b.length >= 8 && ascii(b, 0, 8) === '\x89PNG\r\n\x1a\n') return 'png';
	if (b.length >= 12 && ascii(b, 0, 4) === 'RIFF' && ascii(b, 8, 12) === 'WEBP') return 'webp';
	if (b.length >= 12 && ascii(b, 4, 8) === 'ftyp') {
		const brand = ascii(b, 8, 12);
		if (brand === 'avif' || brand === 'avis') return 'avif';
		if (['heic', 'heix', 'hevc', 'hevx', 'heim', 'heis', 'mif1', 'msf1'].includes(brand)) return 'heic';
	}
	if (looksLikeSvg(b)) return 'svg';
	return 'unknown';
}

function looksLikeSvg(b: Uint8Array): boolean {
	// An <svg element within the first 4 KiB, after whatever XML declaration, comments or doctype come first.
	const head = new TextDecoder('utf-8', { fatal: false }).decode(b.subarray(0, 4096));
	return /<svg[\s>/]/i.test(head);
}

const refuse = (reason: ImageRefusal['reason'], message: string): ImageRefusal => ({ ok: false, reason, message });

/**
 * Checks an upload by content and makes the picture we store: EXIF orientation applied, every piece of metadata
 * (EXIF, GPS, XMP, IPTC, ICC after conversion to sRGB) dropped, long edge capped, re-encoded as JPEG.
 * JPEG because every browser, print path and PDF library reads it; transparency is flattened onto white.
 */
export async function processImage(input: Uint8Array): Promise<ProcessedImage | ImageRefusal> {
	if (input.byteLength === 0) return refuse('empty', EMPTY);
	if (input.byteLength > MAX_IMAGE_BYTES) return refuse('too_large', TOO_LARGE);
	const format = sniffFormat(input);
	if (format === 'svg') return refuse('unsupported', SVG_REFUSED);
	if (format === 'heic') return refuse('unsupported', HEIC_REFUSED);
	if (format === 'unknown') return refuse('unsupported', NOT_A_PHOTO);
	return serialised(() => decode(input, format));
}

/** At most this many pictures are decoded at once: each may hold ~150 MB while it is worked on. */
const MAX_PARALLEL = 2;
let running = 0;
const waiting: (() => void)[] = [];
async function serialised<T>(job: () => Promise<T>): Promise<T> {
	// A finishing job hands its slot straight to the next waiter, so `running` never exceeds the cap.
	if (running >= MAX_PARALLEL) await new Promise<void>((go) => waiting.push(go));
	else running += 1;
	try {
		return await job();
	} finally {
		const next = waiting.shift();
		if (next) next();
		else running -= 1;
	}
}

async function decode(
	input: Uint8Array,
	format: Exclude<SniffedFormat, 'svg' | 'heic' | 'unknown'>
): Promise<ProcessedImage | ImageRefusal> {
	const open = () => sharp(input, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error', pages: 1 });
	let meta: Metadata;
	try {
		meta = await open().metadata();
	} catch (e) {
		return overPixelLimit(e) ? refuse('too_large', TOO_MANY_PIXELS) : refuse('damaged', DAMAGED);
	}
	// The decoder must agree with the signature (sharp reports AVIF as 'heif').
	const expected = format === 'avif' ? 'heif' : format;
	if (meta.format !== expected) return refuse('unsupported', NOT_A_PHOTO);
	if ((meta.width ?? 0) * (meta.height ?? 0) > MAX_INPUT_PIXELS) return refuse('too_large', TOO_MANY_PIXELS);

	try {
		const { data, info } = await open()
			.timeout({ seconds: 20 })
			.rotate()
			.resize({ width: MAX_EDGE_PX, height: MAX_EDGE_PX, fit: 'inside', withoutEnlargement: true })
			.flatten({ background: '#ffffff' })
			.jpeg({ quality: JPEG_QUALITY, mozjpeg: true, chromaSubsampling: format === 'png' ? '4:4:4' : '4:2:0' })
			.toBuffer({ resolveWithObject: true });
		return {
			ok: true,
			bytes: new Uint8Array(data.buffer, data.byteOffset, data.byteLength),
			contentType: 'image/jpeg',
			width: info.width,
			height: info.height,
			sourceFormat: format
		};
	} catch (e) {
		return overPixelLimit(e) ? refuse('too_large', TOO_MANY_PIXELS) : refuse('damaged', DAMAGED);
	}
}

const overPixelLimit = (e: unknown) => e instanceof Error && /pixel limit/i.test(e.message);
