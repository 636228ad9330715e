/** Calendar dates are ISO `YYYY-MM-DD` text everywhere in the registers (PostgreSQL `date`). */
export const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

/** Today's date in UTC as `YYYY-MM-DD`; the server's clock is the authority. */
export const isoDate = (d: Date = new Date()) => d.toISOString().slice(0, 10);

export function addDays(iso: string, days: number): string {
	const d = new Date(`${iso}T00:00:00Z`);
	d.setUTCDate(d.getUTCDate() + days);
	return isoDate(d);
}

export const isRealDate = (iso: string) => ISO_DATE.test(iso) && isoDate(new Date(`${iso}T00:00:00Z`)) === iso;
