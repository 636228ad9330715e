/** The search page's filters as URL parameters (the URL is the state: shareable, kept on reload and back). */
export const FILTER_KEYS = [
	'signer',
	'procedure',
	'version',
	'from',
	'to',
	'findings',
	'conflicts',
	'serial',
	'lot',
	'state'
] as const;
export type FilterKey = (typeof FILTER_KEYS)[number];
export type Filters = Record<FilterKey, string>;

export const emptyFilters = (): Filters => Object.fromEntries(FILTER_KEYS.map((k) => [k, ''])) as Filters;

export function filtersFrom(params: URLSearchParams): Filters {
	return Object.fromEntries(FILTER_KEYS.map((k) => [k, params.get(k) ?? ''])) as Filters;
}

/** Non-empty filters plus sort and page, as a query string. */
export function toQuery(f: Partial<Filters>, extra: Record<string, string | number | undefined> = {}): string {
	const p = new URLSearchParams();
	for (const [k, v] of Object.entries({ ...f, ...extra }))
		if (v !== undefined && String(v).trim() !== '') p.set(k, String(v).trim());
	return p.toString();
}
