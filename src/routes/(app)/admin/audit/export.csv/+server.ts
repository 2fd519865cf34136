import { auditQuerySchema, queryErrors, queryValues } from '$lib/schemas/review';
import { auditBatches } from '$lib/server/audit-log';
import { csvRow } from '$lib/server/csv';
import type { AuditEventDto } from '$lib/server/audit';
import { actingFrom } from '$lib/server/review-actions';
import { httpStatusOf, isExpectedError } from '$lib/server/errors';
import { can } from '$lib/auth/roles';
import type { RequestHandler } from './$types';

const COLUMNS = ['id', 'at_utc', 'actor_id', 'actor_email', 'action', 'entity_type', 'entity_id', 'ip', 'before_json', 'after_json'];

function plain(status: number, message: string): Response {
	return new Response(message, { status, headers: { 'Content-Type': 'text/plain; charset=utf-8', 'Cache-Control': 'no-store' } });
}

/**
 * GET: the audit events matching the same filters as the audit page, newest first, as CSV
 * (RFC 4180, UTF-8, formula-safe cells), streamed in batches. Administrators only (403 otherwise);
 * a bad filter is 400 naming the field.
 */
export const GET: RequestHandler = async (event) => {
	const acting = actingFrom(event);
	if (!can(acting.user.role, 'audit.read')) return plain(403, 'Only administrators can export the audit log.');
	const parsed = auditQuerySchema.safeParse(queryValues(event.url.searchParams));
	if (!parsed.success) {
		const errors = queryErrors(parsed.error);
		return plain(400, Object.values(errors).join(' '));
	}
	const { page: _page, ...filter } = parsed.data;
	void _page;
	const batches = auditBatches(acting, filter);
	let pending: IteratorResult<AuditEventDto[]> | null;
	try {
		// The first batch before answering: a refusal still gets its own status, not a broken file.
		pending = await batches.next();
	} catch (e) {
		if (isExpectedError(e)) return plain(httpStatusOf(e), e.message);
		throw e;
	}
	const encoder = new TextEncoder();
	const stream = new ReadableStream<Uint8Array>({
		start(controller) {
			// A byte-order mark so spreadsheet programs read the file as UTF-8.
			controller.enqueue(encoder.encode(`\uFEFF${csvRow(COLUMNS)}`));
		},
		async pull(controller) {
			const next = pending ?? (await batches.next());
			pending = null;
			if (next.done) {
				controller.close();
				return;
			}
			let chunk = '';
			for (const e of next.value) chunk += csvRow([e.id, e.at, e.actorId, e.actorEmail, e.action, e.entityType, e.entityId, e.ip, e.before, e.after]);
			controller.enqueue(encoder.encode(chunk));
		},
		async cancel() {
			await batches.return(undefined);
		}
	});
	const stamp = new Date().toISOString().slice(0, 10);
	return new Response(stream, {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="loopledger-audit-${stamp}.csv"`,
			'Cache-Control': 'no-store'
		}
	});
};
