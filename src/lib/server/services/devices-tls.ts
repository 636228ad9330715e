/**
 * The shop CA certificate that tablets install, when the HTTPS server (scripts/https-server.ts) serves one: its path
 * and fingerprint come from the environment that server sets. Only the certificate is ever read here, never a key.
 */
import { X509Certificate } from 'node:crypto';
import { readFile } from 'node:fs/promises';

export interface ShopCa {
	pem: string;
	/** SHA-256 fingerprint, AA:BB:… as tablets show it. */
	fingerprint: string;
	subject: string;
	validTo: string;
}

/** The CA certificate on offer, or null when the app is not served with a CA to install. */
export async function shopCa(): Promise<ShopCa | null> {
	const path = process.env.BENCHSTAMP_TLS_CA_FILE;
	if (!path) return null;
	try {
		const pem = await readFile(path, 'utf8');
		const cert = new X509Certificate(pem);
		if (!cert.ca) return null;
		return { pem, fingerprint: cert.fingerprint256, subject: cert.subject.replace(/\n/g, ', '), validTo: cert.validTo };
	} catch {
		return null;
	}
}
