/**
 * The local mail catcher: a small SMTP server (smtp-server) on 127.0.0.1 that accepts every
 * message, parses it (mailparser) and stores sender, recipients, subject, text, HTML, raw size
 * and arrival time in `caught_mail`, so a single-machine install can read what the product sent
 * on the administrators' mail page. It relays nothing. No TLS and no authentication: it only
 * listens on the loopback interface. Relative imports only.
 */
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import sanitizeHtml from 'sanitize-html';
import { Op } from 'sequelize';
import { initModels } from '../db/models';
import { CaughtMail } from '../db/models-workflow';
import { assertCan } from '../../auth/roles';
import { NotFound } from '../errors';
import type { Acting } from '../workflow-common';

/** Largest message the catcher accepts, bytes (10 MiB). */
export const CATCHER_MAX_BYTES = 10 * 1024 * 1024;

/** A running catcher. */
export interface MailCatcher {
	/** The port it listens on (useful when started on port 0). */
	port: number;
	host: string;
	/** Stop listening and close open connections. */
	close(): Promise<void>;
}

/** What the catcher stores of one message. */
export interface CaughtMessage {
	messageId: string | null;
	envelopeFrom: string | null;
	envelopeTo: string[];
	fromHeader: string | null;
	toHeader: string | null;
	subject: string | null;
	text: string | null;
	html: string | null;
	rawSize: number;
	receivedAt: Date;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string | null {
	if (!a) return null;
	const list = Array.isArray(a) ? a : [a];
	const t = list.map((x) => x.text).filter(Boolean).join(', ');
	return t || null;
}

/** Parse a raw RFC 5322 message (with its SMTP envelope) into what the catcher stores. */
export async function parseCaughtMessage(raw: Buffer, envelope: { from: string | null; to: string[] }, receivedAt = new Date()): Promise<CaughtMessage> {
	const parsed = await simpleParser(raw);
	return {
		messageId: parsed.messageId ?? null,
		envelopeFrom: envelope.from,
		envelopeTo: envelope.to,
		fromHeader: addressText(parsed.from),
		toHeader: addressText(parsed.to),
		subject: parsed.subject ?? null,
		text: parsed.text ?? null,
		html: typeof parsed.html === 'string' ? parsed.html : null,
		rawSize: raw.length,
		receivedAt
	};
}

/** Store one parsed message; returns its id. */
export async function storeCaughtMessage(m: CaughtMessage): Promise<number> {
	initModels();
	const row = await CaughtMail.create({
		message_id: m.messageId?.slice(0, 300) ?? null,
		envelope_from: m.envelopeFrom?.slice(0, 254) ?? null,
		envelope_to: m.envelopeTo,
		from_header: m.fromHeader?.slice(0, 500) ?? null,
		to_header: m.toHeader,
		subject: m.subject?.slice(0, 500) ?? null,
		text_body: m.text,
		html_body: m.html,
		raw_size: m.rawSize,
		received_at: m.receivedAt
	});
	return Number(row.id);
}

function readAll(stream: SMTPServerDataStream): Promise<Buffer> {
	return new Promise((resolve, reject) => {
		const chunks: Buffer[] = [];
		stream.on('data', (c: Buffer) => chunks.push(c));
		stream.once('error', reject);
		stream.once('end', () => resolve(Buffer.concat(chunks)));
	});
}

function smtpError(message: string, responseCode: number): Error {
	return Object.assign(new Error(message), { responseCode });
}

/**
 * Start the catcher on `host` (default 127.0.0.1) and `port` (0 = any free port). Resolves once
 * it listens. A message it cannot store is refused with a temporary SMTP error (451), so the
 * sender keeps it and retries.
 */
export function startMailCatcher(options: { port: number; host?: string; onStored?: (id: number) => void }): Promise<MailCatcher> {
	const host = options.host ?? '127.0.0.1';
	const server = new SMTPServer({
		secure: false,
		authOptional: true,
		disabledCommands: ['STARTTLS', 'AUTH'],
		size: CATCHER_MAX_BYTES,
		banner: 'Loopledger mail catcher (stores mail, relays nothing)',
		logger: false,
		closeTimeout: 1_000,
		onData(stream: SMTPServerDataStream, session: SMTPServerSession, callback: (err?: Error | null, message?: string) => void) {
			readAll(stream)
				.then(async (raw) => {
					if (stream.sizeExceeded) throw smtpError(`Message larger than ${CATCHER_MAX_BYTES} bytes`, 552);
					const envelope = {
						from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
						to: session.envelope.rcptTo.map((r) => r.address)
					};
					const id = await storeCaughtMessage(await parseCaughtMessage(raw, envelope));
					options.onStored?.(id);
					callback(null, `Stored as #${id}`);
				})
				.catch((e: unknown) => {
					const code = (e as { responseCode?: number }).responseCode;
					callback(code ? (e as Error) : smtpError(`Cannot store the message now: ${e instanceof Error ? e.message : String(e)}`, 451));
				});
		}
	});
	return new Promise((resolve, reject) => {
		const onError = (e: Error) => reject(e);
		server.once('error', onError);
		server.listen(options.port, host, () => {
			server.off('error', onError);
			server.on('error', (e: Error) => console.error(`[mail-catcher] ${e.message}`));
			const address = server.server.address();
			const port = typeof address === 'object' && address ? address.port : options.port;
			resolve({
				port,
				host,
				close: () => new Promise<void>((done) => server.close(() => done()))
			});
		});
	});
}

// ── Reading what was caught (administrators) ─────────────────────────────────────────────────

/** A caught message in the list. */
export interface CaughtMailListItem {
	id: number;
	from: string | null;
	to: string[];
	subject: string | null;
	receivedAt: string;
	rawSize: number;
}

/** A caught message in full. `safeHtml` is the HTML body sanitised for display (no scripts, no remote images). */
export interface CaughtMailDto extends CaughtMailListItem {
	messageId: string | null;
	fromHeader: string | null;
	toHeader: string | null;
	text: string | null;
	/** The HTML body exactly as received (show it as text, never as markup). */
	html: string | null;
	safeHtml: string | null;
}

/**
 * Caught messages, newest first, `limit` (≤ 200) from `offset`; `q` filters by subject or
 * recipient (substring). Administrators only.
 */
export async function listCaughtMail(
	acting: Acting,
	options: { limit?: number; offset?: number; q?: string } = {}
): Promise<{ items: CaughtMailListItem[]; total: number }> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const q = options.q?.trim();
	const where = q
		? { [Op.or]: [{ subject: { [Op.substring]: q } }, { to_header: { [Op.substring]: q } }, { envelope_from: { [Op.substring]: q } }] }
		: {};
	const { rows, count } = await CaughtMail.findAndCountAll({
		where,
		order: [['id', 'DESC']],
		limit: Math.max(1, Math.min(options.limit ?? 50, 200)),
		offset: Math.max(0, options.offset ?? 0),
		attributes: ['id', 'envelope_from', 'envelope_to', 'from_header', 'subject', 'received_at', 'raw_size']
	});
	return { items: rows.map(listItem), total: count };
}

function listItem(r: CaughtMail): CaughtMailListItem {
	return {
		id: Number(r.id),
		from: r.from_header ?? r.envelope_from,
		to: r.envelope_to,
		subject: r.subject,
		receivedAt: new Date(r.received_at).toISOString(),
		rawSize: Number(r.raw_size)
	};
}

/** Sanitise a received HTML body for display inside the app: text formatting, tables and links only. */
export function sanitiseMailHtml(html: string): string {
	return sanitizeHtml(html, {
		allowedTags: ['p', 'br', 'div', 'span', 'h1', 'h2', 'h3', 'strong', 'b', 'em', 'i', 'ul', 'ol', 'li', 'table', 'thead', 'tbody', 'tr', 'th', 'td', 'a', 'code', 'pre'],
		allowedAttributes: { a: ['href', 'rel', 'target'] },
		allowedSchemes: ['http', 'https', 'mailto'],
		// The document title (and anything else in <head>) is not body text.
		nonTextTags: ['script', 'style', 'textarea', 'option', 'noscript', 'title', 'head'],
		transformTags: { a: sanitizeHtml.simpleTransform('a', { rel: 'noopener noreferrer nofollow', target: '_blank' }) }
	});
}

/** One caught message in full. Administrators only; NotFound when missing. */
export async function getCaughtMail(acting: Acting, id: number): Promise<CaughtMailDto> {
	assertCan(acting.user.role, 'audit.read');
	initModels();
	const r = await CaughtMail.findByPk(id);
	if (!r) throw new NotFound('There is no caught message with this id.');
	return {
		...listItem(r),
		messageId: r.message_id,
		fromHeader: r.from_header,
		toHeader: r.to_header,
		text: r.text_body,
		html: r.html_body,
		safeHtml: r.html_body === null ? null : sanitiseMailHtml(r.html_body)
	};
}
