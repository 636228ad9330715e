import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';

const INPUTS = [
	'src',
	'static',
	'procedures',
	'svelte.config.js',
	'vite.config.ts',
	'tailwind.config.ts',
	'package-lock.json'
];

function newestMtime(path: string): number {
	if (!existsSync(path)) return 0;
	const st = statSync(path);
	if (!st.isDirectory()) return st.mtimeMs;
	let newest = st.mtimeMs;
	for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
	return newest;
}

/** Runs `vite build` when build/ is missing or older than any source; returns whether it built. */
export function buildIfNeeded(root: string, log: (m: string) => void): boolean {
	const built = join(root, 'build', 'handler.js');
	const stale =
		!existsSync(built) || Math.max(...INPUTS.map((p) => newestMtime(join(root, p)))) > statSync(built).mtimeMs;
	if (!stale) return false;
	log('building the app (vite build)…');
	const res = spawnSync(process.execPath, [join(root, 'node_modules', 'vite', 'bin', 'vite.js'), 'build'], {
		cwd: root,
		stdio: 'inherit'
	});
	if (res.status !== 0) throw new Error('vite build failed');
	return true;
}
