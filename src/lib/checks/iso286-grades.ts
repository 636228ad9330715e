/**
 * Standard tolerance values IT1–IT18 for nominal sizes up to 500 mm, in micrometres.
 *
 * Source: ISO 286-1:2010 table 1, from memory. IT12–IT18 are printed in millimetres there and
 * are written here in µm. Each row is cross-checked in iso286-grades.test.ts against the
 * tolerance-unit formula the table is derived from, and the Δ table against IT differences.
 * Columns follow RANGE_UPPER_MM: ≤3, 3–6, 6–10, 10–18, 18–30, 30–50, 50–80, 80–120, 120–180,
 * 180–250, 250–315, 315–400, 400–500.
 */
export const IT_MICROMETRES: Readonly<Record<number, readonly number[]>> = {
	1: [0.8, 1, 1, 1.2, 1.5, 1.5, 2, 2.5, 3.5, 4.5, 6, 7, 8],
	2: [1.2, 1.5, 1.5, 2, 2.5, 2.5, 3, 4, 5, 7, 8, 9, 10],
	3: [2, 2.5, 2.5, 3, 4, 4, 5, 6, 8, 10, 12, 13, 15],
	4: [3, 4, 4, 5, 6, 7, 8, 10, 12, 14, 16, 18, 20],
	5: [4, 5, 6, 8, 9, 11, 13, 15, 18, 20, 23, 25, 27],
	6: [6, 8, 9, 11, 13, 16, 19, 22, 25, 29, 32, 36, 40],
	7: [10, 12, 15, 18, 21, 25, 30, 35, 40, 46, 52, 57, 63],
	8: [14, 18, 22, 27, 33, 39, 46, 54, 63, 72, 81, 89, 97],
	9: [25, 30, 36, 43, 52, 62, 74, 87, 100, 115, 130, 140, 155],
	10: [40, 48, 58, 70, 84, 100, 120, 140, 160, 185, 210, 230, 250],
	11: [60, 75, 90, 110, 130, 160, 190, 220, 250, 290, 320, 360, 400],
	12: [100, 120, 150, 180, 210, 250, 300, 350, 400, 460, 520, 570, 630],
	13: [140, 180, 220, 270, 330, 390, 460, 540, 630, 720, 810, 890, 970],
	14: [250, 300, 360, 430, 520, 620, 740, 870, 1000, 1150, 1300, 1400, 1550],
	15: [400, 480, 580, 700, 840, 1000, 1200, 1400, 1600, 1850, 2100, 2300, 2500],
	16: [600, 750, 900, 1100, 1300, 1600, 1900, 2200, 2500, 2900, 3200, 3600, 4000],
	17: [1000, 1200, 1500, 1800, 2100, 2500, 3000, 3500, 4000, 4600, 5200, 5700, 6300],
	18: [1400, 1800, 2200, 2700, 3300, 3900, 4600, 5400, 6300, 7200, 8100, 8900, 9700]
};

/** Lowest and highest grade tabulated. IT01 and IT0 are not supported (see iso286.ts). */
export const MIN_GRADE = 1;
export const MAX_GRADE = 18;

/** ISO 286-1:2010 table 1 footnote (from memory): IT14–IT18 are not used for sizes up to 1 mm. */
export const FIRST_GRADE_NOT_UNDER_1MM = 14;
