/** "1 record", "2 records", "1,204 records": a count and its noun, the count grouped in thousands. */
export const plural = (n: number, one: string, many = `${one}s`): string =>
	`${n.toLocaleString('en')} ${n === 1 ? one : many}`;
