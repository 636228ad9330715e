/**
 * The built app (adapter-node's `handler.js`) served over HTTPS for the shop network, so tablets get a secure context
 * (service worker, Web Crypto, secure cookies) at the server's LAN name or address. `npm start` runs it with
 * `HTTPS=1` or `--https`; it can also be run alone: `tsx scripts/https-server.ts` (after `vite build`).
 *
 * Settings: `PORT` (default 3443), `HOST` (default 0.0.0.0: the shop network), `TLS_DIR` (default .data/tls),
 * `TLS_NAMES` (extra names for the certificate), `TLS_CERT_FILE` + `TLS_KEY_FILE` (+ `TLS_CA_FILE`) for the shop's
 * own certificate, `HTTP_PORT` for a plain-HTTP listener that serves only /tls (the CA and install steps) and sends
 * everything else to HTTPS. `ORIGIN` is left unset on purpose unless given: adapter-node then takes the origin from
 * the request's Host header with https, so the app works under every LAN name the certificate carries.
 */
import { createServer as createHttpServer } from 'node:http';
import { createServer as createHttpsServer } from 'node:https';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { ensureTls } from './lib/tls';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const log = (m: string) => console.log(`benchstamp https: ${m}`);

async function main() {
	const tls = await ensureTls(process.env.TLS_DIR ?? join(root, '.data', 'tls'), undefined, log);
	// Read by the /tls routes (the CA download); set before the app is imported, which reads env at start.
	if (tls.caCertPath) process.env.BENCHSTAMP_TLS_CA_FILE = tls.caCertPath;
	if (tls.caFingerprint) process.env.BENCHSTAMP_TLS_CA_FINGERPRINT = tls.caFingerprint;
	const buildDir = resolve(root, process.env.BENCHSTAMP_BUILD_DIR ?? 'build');
	const { handler } = (await import(pathToFileURL(join(buildDir, 'handler.js')).href)) as {
		handler: Parameters<typeof createHttpsServer>[1];
	};

	const port = Number(process.env.PORT ?? 3443);
	const host = process.env.HOST ?? '0.0.0.0';
	const server = createHttpsServer({ key: tls.key, cert: tls.cert }, handler);
	server.listen(port, host, () => {
		log(`listening on https://${host}:${port}`);
		if (tls.generated) log(`certificate names: ${tls.names.join(', ')}`);
		if (tls.caFingerprint) log(`tablets install the CA from /tls (SHA-256 ${tls.caFingerprint})`);
	});

	let plain: ReturnType<typeof createHttpServer> | undefined;
	if (process.env.HTTP_PORT) {
		plain = createHttpServer((req, res) => {
			const path = (req.url ?? '/').split('?')[0];
			if (path === '/tls' || path.startsWith('/tls/')) return handler!(req, res);
			const hostName = (req.headers.host ?? 'localhost').replace(/:\d+$/, '');
			res.writeHead(308, { location: `https://${hostName}:${port}${req.url ?? '/'}` }).end();
		});
		plain.listen(Number(process.env.HTTP_PORT), host, () => log(`plain HTTP on ${process.env.HTTP_PORT}: /tls only`));
	}

	// As adapter-node's own index.js: close, then let the app close its pool (`sveltekit:shutdown`).
	let closing = false;
	const shutdown = (reason: string) => {
		if (closing) return;
		closing = true;
		plain?.close();
		server.closeIdleConnections();
		server.close(() => process.emit('sveltekit:shutdown' as 'exit', reason as unknown as number));
		setTimeout(() => server.closeAllConnections(), 30_000).unref();
	};
	process.on('SIGTERM', () => shutdown('SIGTERM'));
	process.on('SIGINT', () => shutdown('SIGINT'));
}

main().catch((e: unknown) => {
	console.error(`benchstamp https: ${e instanceof Error ? e.message : String(e)}`);
	process.exit(1);
});
