/**
 * The notification e-mails of the review workflow, each as subject, plain text and HTML. Every
 * piece of user text (titles, names, comments, summaries) is HTML-escaped in the HTML body; links
 * point at the model page under the app's public origin. Pure; relative imports only.
 */

/** A rendered message. */
export interface MailContent {
	subject: string;
	text: string;
	html: string;
}

/** What the workflow mails are about. */
export type MailKind =
	| 'review_requested'
	| 'approved'
	| 'changes_requested'
	| 'tuning_review_requested'
	| 'tuning_approved'
	| 'tuning_changes_requested'
	| 'revalidation_digest';

const HTML_ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text safe to place in HTML element content and attribute values. */
export function escapeHtml(s: string): string {
	return s.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]);
}

/** One line for a subject: control characters and line breaks become spaces, at most 200 characters. */
function oneLine(s: string, max = 200): string {
	const t = s.replace(/[\u0000-\u001f\u007f]+/g, ' ').replace(/\s+/g, ' ').trim();
	return t.length > max ? `${t.slice(0, max - 1)}…` : t;
}

/** Multi-line user text as escaped HTML paragraphs (line breaks kept). */
function paragraphs(s: string): string {
	return escapeHtml(s)
		.split(/\n{2,}/)
		.map((p) => `<p style="margin:0 0 12px">${p.replace(/\n/g, '<br>')}</p>`)
		.join('');
}

const FOOTER_TEXT =
	'Predictions in Loopledger come from models. Before changing a live loop, follow your site procedures and keep operations informed.';

function layout(title: string, body: string, link: { href: string; label: string } | null, note?: string): string {
	const button = link
		? `<p style="margin:20px 0"><a href="${escapeHtml(link.href)}" style="background:#0f4c4c;color:#ffffff;padding:8px 14px;border-radius:4px;text-decoration:none">${escapeHtml(link.label)}</a></p>`
		: '';
	return [
		'<!doctype html><html lang="en"><head><meta charset="utf-8"><title>',
		escapeHtml(title),
		'</title></head><body style="font-family:Inter,Arial,sans-serif;color:#13232b;background:#f6f8f8;margin:0;padding:24px">',
		'<div style="max-width:600px;margin:0 auto;background:#ffffff;border:1px solid #d5dede;border-radius:6px;padding:24px">',
		`<h1 style="font-size:18px;margin:0 0 16px">${escapeHtml(title)}</h1>`,
		body,
		button,
		note ? `<p style="font-size:12px;color:#4b5d63;margin:16px 0 0">${escapeHtml(note)}</p>` : '',
		`<p style="font-size:12px;color:#4b5d63;margin:16px 0 0">${escapeHtml(FOOTER_TEXT)}</p>`,
		'</div></body></html>'
	].join('');
}

/** Facts about the revision or tuning set a notification is about. */
export interface ReviewMailFacts {
	recipientName: string;
	/** `model` revision or `tuning_set`. */
	subject: 'model' | 'tuning_set';
	modelTitle: string;
	assetTag: string;
	/** Revision number (models) or the loop tag's tuning-set id (tuning sets). */
	revisionNo: number;
	loopTag?: string | null;
	authorName: string;
	reviewerName?: string | null;
	changeSummary?: string | null;
	comment?: string | null;
	/** Absolute URL of the model page. */
	link: string;
}

function what(f: ReviewMailFacts): string {
	return f.subject === 'model'
		? `revision ${f.revisionNo} of “${f.modelTitle}” (${f.assetTag})`
		: `tuning set ${f.revisionNo} for loop ${f.loopTag ?? f.assetTag} on “${f.modelTitle}”`;
}

/** To each eligible reviewer: a revision or tuning set waits for review. */
export function reviewRequestedMail(f: ReviewMailFacts): MailContent {
	const noun = f.subject === 'model' ? 'Model revision' : 'Tuning set';
	const subject = oneLine(`[Loopledger] Review requested: ${f.assetTag} — ${f.modelTitle} (${f.subject === 'model' ? `rev. ${f.revisionNo}` : `tuning ${f.loopTag ?? ''}`.trim()})`, 250);
	const summary = f.changeSummary?.trim() || '(no change summary)';
	const text = [
		`Hello ${f.recipientName},`,
		'',
		`${f.authorName} asks for a review of ${what(f)}.`,
		'',
		'Change summary:',
		summary,
		'',
		`Open it: ${f.link}`,
		'',
		'You can approve it or send it back with a comment. You cannot review work you wrote or edited.',
		'',
		FOOTER_TEXT
	].join('\n');
	const html = layout(
		`${noun} waiting for your review`,
		`<p style="margin:0 0 12px">Hello ${escapeHtml(f.recipientName)},</p>` +
			`<p style="margin:0 0 12px">${escapeHtml(f.authorName)} asks for a review of ${escapeHtml(what(f))}.</p>` +
			'<p style="margin:0 0 4px;font-weight:600">Change summary</p>' +
			paragraphs(summary),
		{ href: f.link, label: 'Open the model' },
		'You can approve it or send it back with a comment. You cannot review work you wrote or edited.'
	);
	return { subject, text, html };
}

/** To the author: the revision or tuning set was approved. */
export function approvedMail(f: ReviewMailFacts): MailContent {
	const subject = oneLine(`[Loopledger] Approved: ${f.assetTag} — ${f.modelTitle} (${f.subject === 'model' ? `rev. ${f.revisionNo}` : `tuning ${f.loopTag ?? ''}`.trim()})`, 250);
	const comment = f.comment?.trim() || '(no comment)';
	const text = [
		`Hello ${f.recipientName},`,
		'',
		`${f.reviewerName ?? 'A reviewer'} approved ${what(f)}. It is now the reference.`,
		'',
		'Review comment:',
		comment,
		'',
		`Open it: ${f.link}`,
		'',
		FOOTER_TEXT
	].join('\n');
	const html = layout(
		'Approved',
		`<p style="margin:0 0 12px">Hello ${escapeHtml(f.recipientName)},</p>` +
			`<p style="margin:0 0 12px">${escapeHtml(f.reviewerName ?? 'A reviewer')} approved ${escapeHtml(what(f))}. It is now the reference.</p>` +
			'<p style="margin:0 0 4px;font-weight:600">Review comment</p>' +
			paragraphs(comment),
		{ href: f.link, label: 'Open the model' }
	);
	return { subject, text, html };
}

/** To the author: the reviewer sent it back with a comment. */
export function changesRequestedMail(f: ReviewMailFacts): MailContent {
	const subject = oneLine(`[Loopledger] Changes requested: ${f.assetTag} — ${f.modelTitle} (${f.subject === 'model' ? `rev. ${f.revisionNo}` : `tuning ${f.loopTag ?? ''}`.trim()})`, 250);
	const comment = f.comment?.trim() || '(no comment)';
	const text = [
		`Hello ${f.recipientName},`,
		'',
		`${f.reviewerName ?? 'A reviewer'} sent ${what(f)} back for changes.`,
		'',
		'What needs to change:',
		comment,
		'',
		`Edit it and submit it again: ${f.link}`,
		'',
		FOOTER_TEXT
	].join('\n');
	const html = layout(
		'Changes requested',
		`<p style="margin:0 0 12px">Hello ${escapeHtml(f.recipientName)},</p>` +
			`<p style="margin:0 0 12px">${escapeHtml(f.reviewerName ?? 'A reviewer')} sent ${escapeHtml(what(f))} back for changes.</p>` +
			'<p style="margin:0 0 4px;font-weight:600">What needs to change</p>' +
			paragraphs(comment),
		{ href: f.link, label: 'Edit and resubmit' }
	);
	return { subject, text, html };
}

/** One model in the revalidation digest. */
export interface DigestItem {
	modelTitle: string;
	assetTag: string;
	revalidateBy: string;
	/** Days from today to revalidate-by: negative = overdue. */
	daysLeft: number;
	link: string;
}

function dueText(d: number): string {
	if (d < 0) return `overdue by ${-d} day${d === -1 ? '' : 's'}`;
	if (d === 0) return 'due today';
	return `due in ${d} day${d === 1 ? '' : 's'}`;
}

/** To the responsible engineer: their models past or near revalidate-by (the weekly digest). */
export function revalidationDigestMail(f: {
	recipientName: string;
	isoWeek: string;
	items: DigestItem[];
	profileLink: string;
}): MailContent {
	const overdue = f.items.filter((i) => i.daysLeft < 0).length;
	const subject = oneLine(
		`[Loopledger] ${f.items.length} model${f.items.length === 1 ? '' : 's'} to revalidate${overdue ? ` (${overdue} overdue)` : ''} — week ${f.isoWeek}`,
		250
	);
	const lines = f.items.map((i) => `- ${i.assetTag} — ${i.modelTitle}: revalidate by ${i.revalidateBy} (${dueText(i.daysLeft)})\n  ${i.link}`);
	const text = [
		`Hello ${f.recipientName},`,
		'',
		'These models you are responsible for are past or near their revalidate-by date. Plan a new',
		'step test, or ask a reviewer to revalidate an unchanged model with a new date.',
		'',
		...lines,
		'',
		`You get this digest weekly. To stop it, change your profile: ${f.profileLink}`,
		'',
		FOOTER_TEXT
	].join('\n');
	const rows = f.items
		.map(
			(i) =>
				`<tr><td style="padding:4px 8px;font-family:'IBM Plex Mono',monospace">${escapeHtml(i.assetTag)}</td>` +
				`<td style="padding:4px 8px"><a href="${escapeHtml(i.link)}">${escapeHtml(i.modelTitle)}</a></td>` +
				`<td style="padding:4px 8px;font-family:'IBM Plex Mono',monospace">${escapeHtml(i.revalidateBy)}</td>` +
				`<td style="padding:4px 8px${i.daysLeft < 0 ? ';color:#9a3412;font-weight:600' : ''}">${escapeHtml(dueText(i.daysLeft))}</td></tr>`
		)
		.join('');
	const html = layout(
		'Models to revalidate',
		`<p style="margin:0 0 12px">Hello ${escapeHtml(f.recipientName)},</p>` +
			'<p style="margin:0 0 12px">These models you are responsible for are past or near their revalidate-by date. Plan a new step test, or ask a reviewer to revalidate an unchanged model with a new date.</p>' +
			'<table style="border-collapse:collapse;font-size:14px"><thead><tr>' +
			'<th style="text-align:left;padding:4px 8px">Tag</th><th style="text-align:left;padding:4px 8px">Model</th>' +
			'<th style="text-align:left;padding:4px 8px">Revalidate by</th><th style="text-align:left;padding:4px 8px">Status</th>' +
			`</tr></thead><tbody>${rows}</tbody></table>`,
		{ href: f.profileLink, label: 'Digest settings' },
		'You get this digest weekly.'
	);
	return { subject, text, html };
}
