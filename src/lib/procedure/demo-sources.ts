/**
 * The demo procedures' source text, bundled by Vite (no file-system access, so tests and any
 * seed or preview code can use it in browser and Node alike). FORMAT.md is the reference page,
 * not a procedure, and is left out.
 */
const all = import.meta.glob('../../../procedures/*.md', { query: '?raw', import: 'default', eager: true }) as Record<
	string,
	string
>;

/** File name (e.g. "ktx7-pressure-sensor.md") → source. */
export const demoSources: Record<string, string> = Object.fromEntries(
	Object.entries(all)
		.map(([path, text]) => [path.slice(path.lastIndexOf('/') + 1), text] as const)
		.filter(([name]) => name !== 'FORMAT.md')
);
