import nodemailer, { type Transporter } from 'nodemailer';
import { env } from './env';

let transport: Transporter | undefined;

/** Points outgoing mail at an SMTP URL: the shop's relay in production, the fake server in dev and tests. */
export function useSmtp(url: string): void {
	transport = nodemailer.createTransport(url);
}

export interface OutgoingMail {
	to: string;
	subject: string;
	text: string;
}

/** Whether {@link useSmtp} ran: the app's runtime always sets a transport; seed scripts and most tests do not. */
export const mailConfigured = (): boolean => transport !== undefined;

export async function sendMail(mail: OutgoingMail): Promise<void> {
	if (!transport) throw new Error('Mail is not configured: set SMTP_URL.');
	await transport.sendMail({ from: env().MAIL_FROM, ...mail });
}

const inFlight = new Set<Promise<unknown>>();

/**
 * Lets a notification run without the caller waiting for it (a request answers before its mail is out), while
 * {@link mailSettled} can still wait for it: a script closes its ORM only once what it started has finished.
 */
export function sendInBackground(sending: Promise<unknown>): void {
	const tracked = sending.then(
		() => {},
		() => {}
	);
	inFlight.add(tracked);
	void tracked.finally(() => inFlight.delete(tracked));
}

/** Notifications started with {@link sendInBackground} and not finished yet. */
export const mailInFlight = (): number => inFlight.size;

/** Resolves once every background notification has finished, including any started while waiting. Never rejects. */
export async function mailSettled(): Promise<void> {
	while (inFlight.size > 0) await Promise.all([...inFlight]);
}
