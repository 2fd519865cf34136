import { describe, expect, it } from 'vitest';
import { hasFilters, parseRegisterQuery, registerSearch, REGISTER_SORT_VALUES } from './register';

const parse = (s: string) => parseRegisterQuery(new URLSearchParams(s));

describe('parseRegisterQuery', () => {
	it('gives the defaults for an empty query', () => {
		expect(parse('')).toEqual({ query: { sort: 'tag', dir: 'asc', page: 1 }, issues: [] });
	});

	it('reads every filter', () => {
		const { query, issues } = parse(
			'q=+TIC-21+&site=2&area=7&kind=heat_exchanger&structure=sopdt&state=in_review&stale=1&sort=gain&dir=desc&page=3'
		);
		expect(issues).toEqual([]);
		expect(query).toEqual({
			q: 'TIC-21',
			site: 2,
			area: 7,
			kind: 'heat_exchanger',
			structure: 'sopdt',
			state: 'in_review',
			stale: true,
			sort: 'gain',
			dir: 'desc',
			page: 3
		});
	});

	it('accepts every sortable column', () => {
		for (const sort of REGISTER_SORT_VALUES) expect(parse(`sort=${sort}`).query.sort).toBe(sort);
	});

	it('treats empty values as not set (a GET form sends them)', () => {
		const { query, issues } = parse('q=&site=&area=&kind=&structure=&state=&sort=&dir=&page=');
		expect(issues).toEqual([]);
		expect(query).toEqual({ sort: 'tag', dir: 'asc', page: 1 });
	});

	it.each([
		['sort=colour', 'sort', 'sort is not a sortable column'],
		['dir=up', 'dir', 'dir must be asc or desc'],
		['page=0', 'page', 'page must be 1 or more'],
		['page=-2', 'page', 'page must be 1 or more'],
		['page=1.5', 'page', 'page must be a whole number'],
		['page=abc', 'page', 'page must be a number'],
		['site=x', 'site', 'site must be a number'],
		['area=0', 'area', 'area must be a positive id'],
		['kind=rocket', 'kind', 'kind is not an asset kind'],
		['structure=pid', 'structure', 'structure is not a model structure'],
		['state=lost', 'state', 'state is not a register state'],
		['stale=yes', 'stale', 'stale must be 1 (only overdue models) or absent'],
		[`q=${'x'.repeat(101)}`, 'q', 'q must be at most 100 characters'],
		['page=1&page=2', 'page', 'page is given more than once']
	])('%s → issue on %s, default kept', (search, field, message) => {
		const { query, issues } = parse(search);
		expect(issues).toEqual([{ field, message }]);
		expect(query.page).toBe(1);
		expect(query.sort).toBe('tag');
		expect(query.dir).toBe('asc');
		const defaults: Record<string, unknown> = { page: 1, sort: 'tag', dir: 'asc' };
		expect((query as unknown as Record<string, unknown>)[field]).toBe(defaults[field]);
	});

	it('keeps the good fields when one is bad', () => {
		const { query, issues } = parse('site=2&sort=nope&page=4');
		expect(query.site).toBe(2);
		expect(query.page).toBe(4);
		expect(issues.map((i) => i.field)).toEqual(['sort']);
	});

	it('ignores unknown parameters', () => {
		expect(parse('utm=1&foo=bar').issues).toEqual([]);
	});
});

describe('registerSearch', () => {
	const base = parse('site=2&structure=fopdt&sort=gain&dir=desc&page=3').query;

	it('round-trips through the URL', () => {
		const s = registerSearch(base);
		expect(parse(s.slice(1)).query).toEqual(base);
	});

	it('leaves defaults out', () => {
		expect(registerSearch(parse('').query)).toBe('');
		expect(registerSearch(parse('sort=tag&dir=asc&page=1').query)).toBe('');
		expect(registerSearch(parse('sort=tag&dir=desc').query)).toBe('?sort=tag&dir=desc');
	});

	it('goes back to page 1 when a filter or the sort changes, not when the page does', () => {
		expect(registerSearch(base, { sort: 'tau', dir: 'asc' })).toBe('?site=2&structure=fopdt&sort=tau');
		expect(registerSearch(base, { site: undefined })).toBe('?structure=fopdt&sort=gain&dir=desc');
		expect(registerSearch(base, { page: 4 })).toBe('?site=2&structure=fopdt&sort=gain&dir=desc&page=4');
	});

	it('knows when filters are set', () => {
		expect(hasFilters(parse('sort=gain&page=2').query)).toBe(false);
		expect(hasFilters(parse('stale=1').query)).toBe(true);
		expect(hasFilters(parse('q=abc').query)).toBe(true);
	});
});
