/**
 * CSV quoting and formula-injection safety against Python's csv module (RFC 4180 form, CRLF),
 * computed by tests/fixtures/review/generate_review_fixtures.py into review-reference.json, with
 * the apostrophe rule for cells starting with = + - @ TAB CR (OWASP "CSV Injection", common practice).
 */
import { describe, expect, it } from 'vitest';
import reference from '../../../tests/fixtures/review/review-reference.json';
import { cellText, csvField, csvRow } from './csv';

describe('csvRow', () => {
	it("writes the reference rows exactly as Python's csv.writer does (after the formula rule)", () => {
		expect(reference.csv.rows.map((r) => csvRow(r)).join('')).toBe(reference.csv.text);
	});
	it('prefixes formula starters with an apostrophe, also inside quotes', () => {
		expect(csvField('=1+1')).toBe("'=1+1");
		expect(csvField('+SUM(A1)')).toBe("'+SUM(A1)");
		expect(csvField('-3')).toBe("'-3");
		expect(csvField('@cmd')).toBe("'@cmd");
		expect(csvField('=A1,"x"')).toBe(`"'=A1,""x"""`);
		expect(csvField('a=b')).toBe('a=b');
	});
	it('writes objects as JSON (quoted, quotes doubled), empty for null and non-finite numbers', () => {
		expect(csvField({ state: 'approved' })).toBe('"{""state"":""approved""}"');
		expect(cellText(null)).toBe('');
		expect(cellText(Number.NaN)).toBe('');
		expect(cellText(Number.POSITIVE_INFINITY)).toBe('');
		expect(cellText(new Date('2026-03-04T05:06:07.000Z'))).toBe('2026-03-04T05:06:07.000Z');
	});
});
