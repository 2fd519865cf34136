/**
 * One-line summaries of an audit event's before/after snapshots for the audit table: the
 * top-level fields that differ, as "field: old → new" (new only when nothing was before), values
 * shortened. Pure; the full JSON stays available next to it.
 */

/** A value shortened for one line: text up to `max` characters, `{…}` for objects, `[n items]` for arrays. */
export function shortValue(v: unknown, max = 40): string {
	if (v === null || v === undefined) return '—';
	if (typeof v === 'string') return v.length > max ? `${v.slice(0, max - 1)}…` : v;
	if (typeof v === 'number' || typeof v === 'boolean') return String(v);
	if (Array.isArray(v)) return v.length <= 3 && v.every((x) => typeof x !== 'object') ? `[${v.join(', ')}]` : `[${v.length} items]`;
	return '{…}';
}

function isRecord(v: unknown): v is Record<string, unknown> {
	return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** At most `max` lines describing what changed from `before` to `after`; the count of lines left out. */
export function auditChangeLines(before: unknown, after: unknown, max = 4): { lines: string[]; more: number } {
	const lines: string[] = [];
	if (isRecord(before) || isRecord(after)) {
		const b = isRecord(before) ? before : {};
		const a = isRecord(after) ? after : {};
		const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])];
		for (const k of keys) {
			const inB = k in b;
			const inA = k in a;
			if (inB && inA && JSON.stringify(b[k]) === JSON.stringify(a[k])) continue;
			if (!inB) lines.push(`${k}: ${shortValue(a[k])}`);
			else if (!inA) lines.push(`${k}: ${shortValue(b[k])} → (removed)`);
			else lines.push(`${k}: ${shortValue(b[k])} → ${shortValue(a[k])}`);
		}
	} else if (JSON.stringify(before ?? null) !== JSON.stringify(after ?? null)) {
		lines.push(`${shortValue(before)} → ${shortValue(after)}`);
	}
	return { lines: lines.slice(0, max), more: Math.max(0, lines.length - max) };
}
