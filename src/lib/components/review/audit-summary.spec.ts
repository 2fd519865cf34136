import { describe, expect, it } from 'vitest';
import { auditChangeLines, shortValue } from './audit-summary';

describe('auditChangeLines', () => {
	it('lists only the fields that differ, old → new', () => {
		const r = auditChangeLines({ state: 'in_review', version: 3, note: 'x' }, { state: 'approved', version: 3, reviewComment: 'ok' });
		expect(r.lines).toEqual(['state: in_review → approved', 'note: x → (removed)', 'reviewComment: ok']);
		expect(r.more).toBe(0);
	});
	it('shows the new values when nothing was before (a creation)', () => {
		expect(auditChangeLines(null, { title: 'Proofer 1', revisionId: 7 }).lines).toEqual(['title: Proofer 1', 'revisionId: 7']);
	});
	it('cuts after max lines and counts the rest', () => {
		const after = Object.fromEntries(Array.from({ length: 7 }, (_, i) => [`f${i}`, i]));
		const r = auditChangeLines({}, after, 4);
		expect(r.lines).toHaveLength(4);
		expect(r.more).toBe(3);
	});
	it('says nothing when before and after are equal', () => {
		expect(auditChangeLines({ a: [1, 2] }, { a: [1, 2] }).lines).toEqual([]);
		expect(auditChangeLines(null, null).lines).toEqual([]);
	});
});

describe('shortValue', () => {
	it('shortens long text, objects and long arrays', () => {
		expect(shortValue('x'.repeat(50), 10)).toBe(`${'x'.repeat(9)}…`);
		expect(shortValue({ a: 1 })).toBe('{…}');
		expect(shortValue([1, 2])).toBe('[1, 2]');
		expect(shortValue([1, 2, 3, 4])).toBe('[4 items]');
		expect(shortValue(null)).toBe('—');
	});
});
