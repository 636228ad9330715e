/**
 * TLS for the shop network: either the shop's own certificate (TLS_CERT_FILE + TLS_KEY_FILE, optional TLS_CA_FILE
 * to offer on /tls) or a local certificate authority made on this machine plus a server certificate for its LAN names
 * and addresses, kept under `.data/tls/`. The CA's private key is written once with mode 0600 and never leaves the
 * machine; only its certificate is served (for tablets to install). X.509 is built with node-forge (Node has no
 * certificate writer); keys come from node:crypto.
 */
import { createHash, generateKeyPairSync, randomBytes, X509Certificate } from 'node:crypto';
import { existsSync } from 'node:fs';
import { chmod, mkdir, readFile, writeFile } from 'node:fs/promises';
import { hostname, networkInterfaces } from 'node:os';
import { isIP } from 'node:net';
import { join } from 'node:path';
import forge from 'node-forge';

export interface TlsMaterial {
	key: string;
	cert: string;
	/** PEM of the CA tablets install (the generated one, or TLS_CA_FILE), or null when there is none to offer. */
	caCertPath: string | null;
	/** base64 sha256 of the server certificate's SubjectPublicKeyInfo (what Chromium's SPKI allow-list takes). */
	spkiSha256: string;
	/** sha256 fingerprint of the CA certificate as tablets show it (AA:BB:…), or null. */
	caFingerprint: string | null;
	names: string[];
	generated: boolean;
}

const DAY = 86_400_000;
/** Server certificates live 397 days (the longest browsers accept for public ones; tablets apply it to all). */
const LEAF_DAYS = 397;
const CA_YEARS = 10;
/** Renew the server certificate when it has less than this left. */
const RENEW_DAYS = 30;

/** The names and addresses this machine answers to on the shop network, plus `TLS_NAMES` (comma-separated). */
export function lanNames(extra = process.env.TLS_NAMES ?? ''): string[] {
	const host = hostname();
	const names = new Set<string>(['localhost', '127.0.0.1', '::1', host, `${host}.local`]);
	for (const list of Object.values(networkInterfaces()))
		for (const a of list ?? []) if (!a.internal && a.family === 'IPv4') names.add(a.address);
	for (const n of extra.split(',')) if (n.trim()) names.add(n.trim().toLowerCase());
	return [...names];
}

const pemKeyPair = () =>
	generateKeyPairSync('rsa', {
		modulusLength: 2048,
		publicKeyEncoding: { type: 'spki', format: 'pem' },
		privateKeyEncoding: { type: 'pkcs8', format: 'pem' }
	});

/** A positive serial number of 16 random bytes (RFC 5280 §4.1.2.2: at most 20 octets, positive). */
const serial = () => '01' + randomBytes(15).toString('hex');

function makeCa(commonName: string) {
	const pair = pemKeyPair();
	const cert = forge.pki.createCertificate();
	cert.publicKey = forge.pki.publicKeyFromPem(pair.publicKey);
	cert.serialNumber = serial();
	cert.validity.notBefore = new Date(Date.now() - DAY);
	cert.validity.notAfter = new Date(Date.now() + CA_YEARS * 365 * DAY);
	const subject = [
		{ name: 'commonName', value: commonName },
		{ name: 'organizationName', value: 'Benchstamp local certificate authority' }
	];
	cert.setSubject(subject);
	cert.setIssuer(subject);
	cert.setExtensions([
		{ name: 'basicConstraints', cA: true, pathLenConstraint: 0, critical: true },
		{ name: 'keyUsage', keyCertSign: true, cRLSign: true, critical: true },
		{ name: 'subjectKeyIdentifier' }
	]);
	cert.sign(forge.pki.privateKeyFromPem(pair.privateKey), forge.md.sha256.create());
	return { key: pair.privateKey, cert: forge.pki.certificateToPem(cert) };
}

function makeLeaf(ca: { key: string; cert: string }, names: string[]) {
	const pair = pemKeyPair();
	const caCert = forge.pki.certificateFromPem(ca.cert);
	const cert = forge.pki.createCertificate();
	cert.publicKey = forge.pki.publicKeyFromPem(pair.publicKey);
	cert.serialNumber = serial();
	cert.validity.notBefore = new Date(Date.now() - DAY);
	cert.validity.notAfter = new Date(Date.now() + LEAF_DAYS * DAY);
	cert.setSubject([{ name: 'commonName', value: names.find((n) => !isIP(n) && n !== 'localhost') ?? 'localhost' }]);
	cert.setIssuer(caCert.subject.attributes);
	cert.setExtensions([
		{ name: 'basicConstraints', cA: false, critical: true },
		{ name: 'keyUsage', digitalSignature: true, keyEncipherment: true, critical: true },
		{ name: 'extKeyUsage', serverAuth: true },
		// type 2 = dNSName, 7 = iPAddress (RFC 5280 §4.2.1.6).
		{ name: 'subjectAltName', altNames: names.map((n) => (isIP(n) ? { type: 7, ip: n } : { type: 2, value: n })) },
		{ name: 'subjectKeyIdentifier' },
		{ name: 'authorityKeyIdentifier', keyIdentifier: caCert.generateSubjectKeyIdentifier().getBytes() }
	]);
	cert.sign(forge.pki.privateKeyFromPem(ca.key), forge.md.sha256.create());
	return { key: pair.privateKey, cert: forge.pki.certificateToPem(cert) };
}

export function spkiSha256(certPem: string): string {
	const spki = new X509Certificate(certPem).publicKey.export({ type: 'spki', format: 'der' });
	return createHash('sha256').update(spki).digest('base64');
}

const fingerprintOf = async (path: string) => new X509Certificate(await readFile(path)).fingerprint256;

async function writePrivate(path: string, pem: string) {
	await writeFile(path, pem, { mode: 0o600 });
	await chmod(path, 0o600);
}

/** True when the certificate names exactly `names` and is valid for at least RENEW_DAYS more. */
function leafStillGood(certPem: string, caPem: string, names: string[]): boolean {
	const c = new X509Certificate(certPem);
	if (!c.verify(new X509Certificate(caPem).publicKey)) return false;
	if (new Date(c.validTo).getTime() - Date.now() < RENEW_DAYS * DAY) return false;
	const san = (c.subjectAltName ?? '').split(', ').map((e) => e.replace(/^(DNS|IP Address):/, '').toLowerCase());
	const want = names.map((n) => (n === '::1' ? '0:0:0:0:0:0:0:1' : n.toLowerCase()));
	const have = new Set(san.map((n) => (n === '::1' ? '0:0:0:0:0:0:0:1' : n)));
	return want.length === have.size && want.every((n) => have.has(n));
}

/**
 * The key and certificate to serve. With TLS_CERT_FILE/TLS_KEY_FILE: those files. Otherwise the local CA in `dir`
 * (made once) and a server certificate for `names`, remade when the names change or it nears its end.
 */
export async function ensureTls(
	dir: string,
	names = lanNames(),
	log: (m: string) => void = () => {}
): Promise<TlsMaterial> {
	const own = process.env.TLS_CERT_FILE;
	if (own || process.env.TLS_KEY_FILE) {
		if (!own || !process.env.TLS_KEY_FILE) throw new Error('Set both TLS_CERT_FILE and TLS_KEY_FILE, or neither.');
		const cert = await readFile(own, 'utf8');
		const caPath = process.env.TLS_CA_FILE ?? null;
		return {
			key: await readFile(process.env.TLS_KEY_FILE, 'utf8'),
			cert,
			caCertPath: caPath,
			spkiSha256: spkiSha256(cert),
			caFingerprint: caPath ? await fingerprintOf(caPath) : null,
			names: [],
			generated: false
		};
	}
	await mkdir(dir, { recursive: true, mode: 0o700 });
	const caKeyPath = join(dir, 'ca.key');
	const caCertPath = join(dir, 'ca.crt');
	if (!existsSync(caKeyPath) || !existsSync(caCertPath)) {
		const ca = makeCa(`Benchstamp shop CA (${hostname()})`);
		await writePrivate(caKeyPath, ca.key);
		await writeFile(caCertPath, ca.cert);
		log(`made a local certificate authority in ${caCertPath} (its key stays in ${caKeyPath})`);
	}
	const ca = { key: await readFile(caKeyPath, 'utf8'), cert: await readFile(caCertPath, 'utf8') };
	const keyPath = join(dir, 'server.key');
	const certPath = join(dir, 'server.crt');
	const current = existsSync(certPath) && existsSync(keyPath) ? await readFile(certPath, 'utf8') : null;
	if (!current || !leafStillGood(current, ca.cert, names)) {
		const leaf = makeLeaf(ca, names);
		await writePrivate(keyPath, leaf.key);
		await writeFile(certPath, leaf.cert);
		log(`made a server certificate for ${names.join(', ')}`);
	}
	const cert = await readFile(certPath, 'utf8');
	return {
		key: await readFile(keyPath, 'utf8'),
		cert,
		caCertPath,
		spkiSha256: spkiSha256(cert),
		caFingerprint: await fingerprintOf(caCertPath),
		names,
		generated: true
	};
}
