import { describe, expect, it } from 'vitest';
import { auditQuerySchema, historyQuerySchema, modelRevisionQuerySchema, queryErrors, queryValues, reviewQueueQuerySchema } from './review';

const parse = (schema: { safeParse: (v: unknown) => { success: boolean; data?: unknown; error?: unknown } }, qs: string) =>
	schema.safeParse(queryValues(new URLSearchParams(qs)));

describe('review query schemas', () => {
	it('reads queue filters; empty values mean "not given"', () => {
		const r = reviewQueueQuerySchema.safeParse(queryValues(new URLSearchParams('site=3&structure=fopdt&author=&age=7&kind=tuning_set&mine=1')));
		expect(r.success && r.data).toEqual({ site: 3, structure: 'fopdt', author: undefined, age: 7, kind: 'tuning_set', mine: '1' });
	});
	it('names the field of a bad queue filter', () => {
		const r = reviewQueueQuerySchema.safeParse(queryValues(new URLSearchParams('site=x&age=5&structure=pid')));
		expect(r.success).toBe(false);
		if (!r.success) expect(queryErrors(r.error)).toEqual({ site: 'Site: choose one from the list.', age: 'Waiting: choose one from the list.', structure: 'Structure: choose one from the list.' });
	});
	it('reads audit filters and refuses a range that ends before it starts, under "to"', () => {
		const ok = auditQuerySchema.safeParse(queryValues(new URLSearchParams('action=revision.*&from=2026-03-01&to=2026-03-01&page=2')));
		expect(ok.success && ok.data).toMatchObject({ action: 'revision.*', from: '2026-03-01', to: '2026-03-01', page: 2 });
		const bad = auditQuerySchema.safeParse(queryValues(new URLSearchParams('from=2026-03-02&to=2026-03-01')));
		expect(bad.success).toBe(false);
		if (!bad.success) expect(queryErrors(bad.error)).toEqual({ to: 'To: choose a day on or after From.' });
		const notDate = auditQuerySchema.safeParse(queryValues(new URLSearchParams('from=2026-02-30&action=DROP TABLE')));
		expect(notDate.success).toBe(false);
		if (!notDate.success) expect(Object.keys(queryErrors(notDate.error)).sort()).toEqual(['action', 'from']);
	});
	it('reads revision ids of the history and model pages; the first value of a repeated key wins', () => {
		expect(parse(historyQuerySchema, 'a=4&b=9&a=5')).toMatchObject({ success: true, data: { a: 4, b: 9 } });
		expect(parse(modelRevisionQuerySchema, 'revision=0').success).toBe(false);
		expect(parse(modelRevisionQuerySchema, '')).toEqual({ success: true, data: {} });
	});
});
