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

export async function sendMail(mail: OutgoingMail): Promise<void> {
	if (!transport) throw new Error('Mail is not configured: set SMTP_URL.');
	await transport.sendMail({ from: env().MAIL_FROM, ...mail });
}
