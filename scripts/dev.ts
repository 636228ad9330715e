/** `npm run dev`: the same preparation as `npm start`, then Vite's dev server with hot reload on :5173. */
import { spawn } from 'node:child_process';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { prepare } from './lib/prepare';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

const { env } = await prepare(root, (m) => console.log(`benchstamp: ${m}`));
const vite = spawn(
	process.execPath,
	[join(root, 'node_modules', 'vite', 'bin', 'vite.js'), 'dev', ...process.argv.slice(2)],
	{
		cwd: root,
		stdio: 'inherit',
		env: { ...process.env, ...env }
	}
);
for (const signal of ['SIGINT', 'SIGTERM'] as const) process.on(signal, () => vite.kill(signal));
vite.on('exit', (code) => process.exit(code ?? 0));
