/**
 * ISO 286 limits and fits: tolerance classes such as H7 or g6 turned into limit deviations,
 * and hole/shaft pairs such as 25 H7/g6 into clearances. Nominal sizes 0 < D ≤ 500 mm.
 *
 * Only the data of tables 1–3 of ISO 286-1:2010 is stored (iso286-grades.ts,
 * iso286-deviations.ts); the limits of each class are derived by the rules of the standard, the
 * same way ISO 286-2 derives its tables. Tests compare derived limits with ISO 286-2 values.
 */
import { add, div, type Exact, ex, exact, le, sub } from './exact';
import { DELTA, SHAFT_EI, SHAFT_ES, SHAFT_K_EI_IT4_TO_IT7 } from './iso286-deviations';
import { FIRST_GRADE_NOT_UNDER_1MM, IT_MICROMETRES, MAX_GRADE, MIN_GRADE } from './iso286-grades';
import { MAX_NOMINAL_MM, rangeIndex } from './iso286-ranges';
import { formatValue } from './format';

/** A tolerance class: 'H7' is { letter: 'H', grade: 7, feature: 'hole' }; 'js6' a shaft. */
export interface ToleranceClass {
	letter: string;
	grade: number;
	feature: 'hole' | 'shaft';
}

/** Every fundamental-deviation letter ISO 286-1 defines (I, L, O, Q, W are not used). */
const ISO_LETTERS = 'a b c cd d e ef f fg g h js j k m n p r s t u v x y z za zb zc'.split(' ');

/** Letters this module computes. */
export const SUPPORTED_SHAFT_LETTERS = ['d', 'e', 'f', 'g', 'h', 'js', 'k', 'm', 'n', 'p'] as const;
/** Hole letters this module computes. */
export const SUPPORTED_HOLE_LETTERS = ['D', 'E', 'F', 'G', 'H', 'JS', 'K', 'M', 'N', 'P'] as const;

const CLASS = /^([A-Za-z]{1,2})(\d{1,2})$/;

/**
 * Parses a class written the ISO way: capital letters for holes ('H7', 'JS7'), small letters for
 * shafts ('g6', 'js6'), grade 1–18. Mixed case ('Js7'), unknown letters, grades outside 1–18
 * and IT0/IT01 give undefined.
 */
export function parseToleranceClass(text: string): ToleranceClass | undefined {
	const m = CLASS.exec(text.trim());
	if (!m) return undefined;
	const [, letters, gradeText] = m;
	const lower = letters.toLowerCase();
	const feature = letters === lower ? 'shaft' : letters === letters.toUpperCase() ? 'hole' : undefined;
	if (!feature || !ISO_LETTERS.includes(lower) || gradeText.startsWith('0')) return undefined;
	const grade = Number(gradeText);
	if (grade < MIN_GRADE || grade > MAX_GRADE) return undefined;
	return { letter: letters, grade, feature };
}

/** Limit deviations of a class at a size (mm, signed), or a sentence why there are none. */
export type Iso286Result =
	{ ok: true; upper: Exact; lower: Exact; it: Exact /* all mm */ } | { ok: false; message: string };

function um(value: number): Exact {
	return div(ex(value), ex(1000));
}

function sizeText(nominalMm: Exact): string {
	return `${formatValue(nominalMm)} mm`;
}

/** Message when a nominal size is outside 0 < D ≤ 500 mm, else undefined. */
function sizeProblem(nominalMm: Exact): string | undefined {
	if (le(nominalMm, ex(0))) return 'A nominal size must be greater than 0 mm.';
	if (rangeIndex(nominalMm) === undefined) {
		return `ISO 286 values are built in up to ${MAX_NOMINAL_MM} mm only; ${sizeText(nominalMm)} is beyond that.`;
	}
	return undefined;
}

/**
 * Standard tolerance ITgrade in mm (ISO 286-1:2010 table 1) for 0 < nominal ≤ 500 mm and grade
 * 1–18; undefined outside, and for IT14–IT18 at sizes up to 1 mm where the standard gives none.
 */
export function standardTolerance(nominalMm: Exact, grade: number): Exact | undefined {
	const i = rangeIndex(nominalMm);
	const row = IT_MICROMETRES[grade];
	if (i === undefined || row === undefined) return undefined;
	if (grade >= FIRST_GRADE_NOT_UNDER_1MM && le(nominalMm, ex(1))) return undefined;
	return um(row[i]);
}

/**
 * Half the tolerance of JS/js classes, ±IT/2. For grades 7 to 11 an odd IT in µm is first rounded
 * down to the even value below, so that the deviations are whole micrometres (ISO 286-1:2010,
 * note on JS/js in tables 2 and 3, from memory; ISO 286-2 js7 over 18 up to 30 mm is ±10 µm
 * although IT7 there is 21 µm). Grades below 7 keep half micrometres (js6 at 18–30: ±6.5 µm).
 */
function jsHalfWidthUm(itUm: number, grade: number): number {
	const evened = grade >= 7 && grade <= 11 && Number.isInteger(itUm) && itUm % 2 === 1 ? itUm - 1 : itUm;
	return evened / 2;
}

/** Δ for a hole grade 3–8 in range i, µm. */
function delta(grade: number, i: number): number | undefined {
	const row = DELTA[grade as keyof typeof DELTA];
	return row === undefined ? undefined : row[i];
}

type DeviationsUm = { upper: number; lower: number } | { message: string };

function shaftDeviationsUm(letter: string, grade: number, i: number, it: number): DeviationsUm {
	switch (letter) {
		case 'd':
		case 'e':
		case 'f':
		case 'g': {
			const es = SHAFT_ES[letter][i];
			return { upper: es, lower: es - it };
		}
		case 'h':
			return { upper: 0, lower: -it };
		case 'js': {
			const half = jsHalfWidthUm(it, grade);
			return { upper: half, lower: -half };
		}
		case 'k': {
			const ei = grade >= 4 && grade <= 7 ? SHAFT_K_EI_IT4_TO_IT7[i] : 0;
			return { upper: ei + it, lower: ei };
		}
		case 'm':
		case 'n':
		case 'p': {
			const ei = SHAFT_EI[letter][i];
			return { upper: ei + it, lower: ei };
		}
		default:
			return { message: unsupported(letter + grade) };
	}
}

/**
 * Holes by the rules of ISO 286-1:2010 (from memory):
 * - A to H: EI = −es of the shaft with the same letter (general rule).
 * - K, M, N up to IT8 and P up to IT7: ES = −ei + Δ ("special rule"), Δ = IT(n) − IT(n−1).
 * - Above those grades: K has ES = 0, M has ES = −ei, N has ES = 0, P has ES = −ei.
 * - Up to 3 mm there is no Δ: K ES = 0, M ES = −2, N ES = −4, P ES = −6 µm for every grade.
 * - M6 over 250 up to 315 mm: ES = −9 µm instead of −11 (special case in table 3).
 */
function holeDeviationsUm(letter: string, grade: number, i: number, it: number): DeviationsUm {
	const fromEs = (es: number): DeviationsUm => ({ upper: es, lower: es - it });
	switch (letter) {
		case 'D':
		case 'E':
		case 'F':
		case 'G': {
			const ei = -SHAFT_ES[letter.toLowerCase() as 'd' | 'e' | 'f' | 'g'][i];
			return { upper: ei + it, lower: ei };
		}
		case 'H':
			return { upper: it, lower: 0 };
		case 'JS': {
			const half = jsHalfWidthUm(it, grade);
			return { upper: half, lower: -half };
		}
		case 'K':
		case 'M':
		case 'N':
		case 'P': {
			const shaftEi = letter === 'K' ? SHAFT_K_EI_IT4_TO_IT7[i] : SHAFT_EI[letter.toLowerCase() as 'm' | 'n' | 'p'][i];
			if (i === 0) return fromEs(-shaftEi); // up to 3 mm: no Δ
			const deltaLimit = letter === 'P' ? 7 : 8;
			if (grade > deltaLimit) return fromEs(letter === 'K' || letter === 'N' ? 0 : -shaftEi);
			if (letter === 'M' && grade === 6 && i === 10) return fromEs(-9);
			const d = delta(grade, i);
			if (d === undefined) {
				return {
					message: `ISO 286 gives ${letter} holes from grade 3 only; ${letter}${grade} has no Δ value.`
				};
			}
			return fromEs(-shaftEi + d);
		}
		default:
			return { message: unsupported(letter + grade) };
	}
}

function unsupported(cls: string): string {
	return (
		`Tolerance class ${cls} is not supported yet; supported are holes ${SUPPORTED_HOLE_LETTERS.join(', ')} ` +
		`and shafts ${SUPPORTED_SHAFT_LETTERS.join(', ')}.`
	);
}

function notAClass(text: string): string {
	if (/^[A-Za-z]{1,2}0\d?$/.test(text.trim())) {
		return `Grades IT0 and IT01 are not supported; "${text.trim()}" needs grade 1 to 18.`;
	}
	return `"${text.trim()}" is not a tolerance class; write a letter and a grade such as H7.`;
}

/**
 * Upper and lower limit deviations (mm, signed, relative to the nominal) and IT of a class at
 * a nominal size. For JS/js the deviations use the evened IT (see above), `it` is the table value.
 */
export function iso286Deviations(nominalMm: Exact, cls: string): Iso286Result {
	const tc = parseToleranceClass(cls);
	if (!tc) return { ok: false, message: notAClass(cls) };
	const problem = sizeProblem(nominalMm);
	if (problem) return { ok: false, message: problem };
	const i = rangeIndex(nominalMm) as number;
	const it = IT_MICROMETRES[tc.grade][i];
	if (tc.grade >= FIRST_GRADE_NOT_UNDER_1MM && le(nominalMm, ex(1))) {
		return {
			ok: false,
			message: `ISO 286 gives no grade ${tc.grade} for sizes up to 1 mm; use grade 13 or finer.`
		};
	}
	if (tc.letter === 'N' && tc.grade > 8 && le(nominalMm, ex(1))) {
		return {
			ok: false,
			message: `ISO 286 does not use N holes above grade 8 for sizes up to 1 mm.`
		};
	}
	const dev =
		tc.feature === 'hole'
			? holeDeviationsUm(tc.letter, tc.grade, i, it)
			: shaftDeviationsUm(tc.letter, tc.grade, i, it);
	if ('message' in dev) return { ok: false, message: dev.message };
	return { ok: true, upper: um(dev.upper), lower: um(dev.lower), it: um(it) };
}

/** A hole/shaft pair at one nominal size, e.g. 18 H7/g6. */
export interface Fit {
	nominal: Exact;
	hole: string;
	shaft: string;
}

const FIT = /^[Ø⌀ø]?\s*(\d+(?:\.\d+)?|\.\d+)\s*(?:mm)?\s*([A-Z]{1,2}\d{1,2})\s*\/\s*([a-z]{1,2}\d{1,2})$/;

/**
 * Parses "18 H7/g6", "18H7/g6", "Ø18 H7/g6", "⌀ 25.4 mm H8/f7". The hole comes first (capitals),
 * then the shaft. Returns undefined when the text is not written that way.
 */
export function parseFit(text: string): Fit | undefined {
	const m = FIT.exec(text.trim());
	if (!m) return undefined;
	const nominal = exact(m[1]);
	if (!nominal) return undefined;
	return { nominal, hole: m[2], shaft: m[3] };
}

/** Limits of a fit's hole and shaft and its clearance range (mm), or a sentence why not. */
export type FitResult =
	| {
			ok: true;
			hole: { min: Exact; max: Exact };
			shaft: { min: Exact; max: Exact };
			/** mm, negative = interference */
			minClearance: Exact;
			maxClearance: Exact;
	  }
	| { ok: false; message: string };

/**
 * Limits of hole and shaft in mm and the clearance range of the pair: minimum clearance =
 * smallest hole − largest shaft, maximum = largest hole − smallest shaft; negative values are
 * interference.
 */
export function fitLimits(fit: Fit): FitResult {
	const hole = iso286Deviations(fit.nominal, fit.hole);
	if (!hole.ok) return hole;
	const shaft = iso286Deviations(fit.nominal, fit.shaft);
	if (!shaft.ok) return shaft;
	if (parseToleranceClass(fit.hole)?.feature !== 'hole') {
		return {
			ok: false,
			message: `${fit.hole} is a shaft class; write the hole first, such as H7/g6.`
		};
	}
	if (parseToleranceClass(fit.shaft)?.feature !== 'shaft') {
		return {
			ok: false,
			message: `${fit.shaft} is a hole class; write the shaft second, such as H7/g6.`
		};
	}
	const h = { min: add(fit.nominal, hole.lower), max: add(fit.nominal, hole.upper) };
	const s = { min: add(fit.nominal, shaft.lower), max: add(fit.nominal, shaft.upper) };
	return {
		ok: true,
		hole: h,
		shaft: s,
		minClearance: sub(h.min, s.max),
		maxClearance: sub(h.max, s.min)
	};
}

/** Clearance, transition or interference fit. */
export type FitKind = 'clearance' | 'transition' | 'interference';

/**
 * Kind of fit from its clearance range: clearance when the minimum clearance is ≥ 0, interference
 * when the maximum clearance is ≤ 0, transition otherwise (the definitions of clearance,
 * transition and interference fit in ISO 286-1:2010 clause 3, from memory).
 */
export function fitKind(minClearance: Exact, maxClearance: Exact): FitKind {
	if (le(ex(0), minClearance)) return 'clearance';
	if (le(maxClearance, ex(0))) return 'interference';
	return 'transition';
}
