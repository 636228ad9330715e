import { mkdir, readdir, readFile, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { createRequire } from 'node:module';
import type * as SmtpServerModule from 'smtp-server';
import type * as MailparserModule from 'mailparser';

// Loaded with Node's own require at run time: bundled, these CommonJS packages resolve a nested
// nodemailer through a directory import that ESM refuses.
const require = createRequire(import.meta.url);
const { SMTPServer } = require('smtp-server') as typeof SmtpServerModule;
const { simpleParser } = require('mailparser') as typeof MailparserModule;

/** One message as the fake SMTP server captured it. */
export interface CapturedMail {
	id: string;
	receivedAt: string;
	from: string;
	to: string[];
	subject: string;
	text: string;
	html: string | null;
}

/**
 * A real SMTP server on 127.0.0.1 that keeps every message it receives as a JSON file in `dir`,
 * standing in for the shop's mail relay in dev, demo and tests. Files let another process (a test) read them.
 */
export async function startFakeSmtp(port: number, dir: string): Promise<{ port: number; close: () => Promise<void> }> {
	await mkdir(dir, { recursive: true });
	const server = new SMTPServer({
		authOptional: true,
		disabledCommands: ['STARTTLS'],
		logger: false,
		size: 5 * 1024 * 1024,
		onData(stream, session, callback) {
			simpleParser(stream)
				.then(async (parsed) => {
					const id = `${Date.now()}-${Math.random().toString(36).slice(2, 8)}`;
					const mail: CapturedMail = {
						id,
						receivedAt: new Date().toISOString(),
						from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
						to: session.envelope.rcptTo.map((r) => r.address),
						subject: parsed.subject ?? '',
						text: parsed.text ?? '',
						html: typeof parsed.html === 'string' ? parsed.html : null
					};
					await writeFile(join(dir, `${id}.json`), JSON.stringify(mail, null, 2));
					callback();
				})
				.catch((e: Error) => callback(e));
		}
	});
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(port, '127.0.0.1', () => resolve());
	});
	const address = server.server.address();
	const actualPort = typeof address === 'object' && address ? address.port : port;
	return { port: actualPort, close: () => new Promise<void>((r) => server.close(() => r())) };
}

/** Captured messages, newest first. */
export async function readCapturedMail(dir: string): Promise<CapturedMail[]> {
	let names: string[];
	try {
		names = (await readdir(dir)).filter((n) => n.endsWith('.json'));
	} catch {
		return [];
	}
	const mails = await Promise.all(
		names.map(async (n) => JSON.parse(await readFile(join(dir, n), 'utf8')) as CapturedMail)
	);
	return mails.sort((a, b) => b.receivedAt.localeCompare(a.receivedAt));
}
