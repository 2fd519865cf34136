/**
 * Where mail goes: the SMTP relay of `SMTP_URL` when set, else the local mail catcher on
 * 127.0.0.1:`SMTP_CATCHER_PORT` (default 2525). Built on nodemailer. Relative imports only.
 */
import nodemailer from 'nodemailer';
import { env } from '../env';

/** One message handed to a transport. */
export interface OutgoingMail {
	from: string;
	to: string;
	subject: string;
	text: string;
	html: string;
	/** Message-ID header, fixed per outbox row. */
	messageId: string;
}

/** What the worker needs of a transport (nodemailer's transporter fits; tests may pass their own). */
export interface MailTransport {
	sendMail(mail: OutgoingMail): Promise<unknown>;
	close?(): void;
}

/** Where the default transport sends, for logs and the admin page (no credentials). */
export function mailDestination(): string {
	const e = env();
	if (e.SMTP_URL) {
		try {
			const u = new URL(e.SMTP_URL);
			return `${u.protocol}//${u.hostname}${u.port ? `:${u.port}` : ''}`;
		} catch {
			return 'the configured SMTP relay';
		}
	}
	return `the local mail catcher at 127.0.0.1:${e.SMTP_CATCHER_PORT}`;
}

/**
 * A nodemailer transport: `SMTP_URL` (smtp:// or smtps://, credentials in the URL) when set,
 * otherwise plain SMTP to the local catcher (no TLS, no auth — it only listens on 127.0.0.1).
 * `port` overrides the catcher port (tests). Short timeouts, so a dead server fails fast and the
 * worker's back-off takes over.
 */
export function createMailTransport(options: { port?: number; url?: string } = {}): MailTransport {
	const e = env();
	const url = options.url ?? (options.port === undefined ? e.SMTP_URL : undefined);
	const timeouts = { connectionTimeout: 5_000, greetingTimeout: 5_000, socketTimeout: 20_000 };
	if (url) return nodemailer.createTransport(url, timeouts) as unknown as MailTransport;
	return nodemailer.createTransport({
		host: '127.0.0.1',
		port: options.port ?? e.SMTP_CATCHER_PORT,
		secure: false,
		ignoreTLS: true,
		...timeouts
	}) as unknown as MailTransport;
}
