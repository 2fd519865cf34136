/**
 * The chart palette: Okabe–Ito colours (Okabe & Ito, "Color Universal Design", 2008: blue
 * #0072B2, vermillion #D55E00, bluish green #009E73, reddish purple #CC79A7, sky blue #56B4E9,
 * orange #E69F00, yellow #F0E442), lines at least 3:1 against the panel (WCAG 2.1, 1.4.11
 * non-text contrast; the ratio formula of WCAG 2.1 "contrast ratio", checked on its published
 * extremes 21:1 and 1:1), and distinct dash patterns for the comparison sets.
 */
import { describe, expect, it } from 'vitest';
import { chartPalette, contrastRatio } from './palette';

describe('chart palette', () => {
	it('computes the WCAG contrast ratio (black on white 21:1, a colour on itself 1:1)', () => {
		expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 10);
		expect(contrastRatio('#0072B2', '#0072B2')).toBe(1);
	});

	for (const dark of [false, true]) {
		const p = chartPalette(dark);
		it(`${dark ? 'dark' : 'light'}: every line reaches 3:1 against the panel`, () => {
			for (const c of [p.pv, p.mv, p.pole, p.zero, p.marker, ...p.compare.map((x) => x.stroke)]) {
				expect(contrastRatio(c, p.tokens.panel), c).toBeGreaterThanOrEqual(3);
			}
		});
		it(`${dark ? 'dark' : 'light'}: PV and MV are Okabe–Ito colours and the comparison sets differ in colour and dash`, () => {
			const okabeIto = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#56B4E9', '#E69F00', '#F0E442'];
			expect(okabeIto).toContain(p.pv);
			expect(okabeIto).toContain(p.mv);
			expect(new Set(p.compare.map((c) => c.stroke)).size).toBe(4);
			expect(new Set(p.compare.map((c) => c.dash.join(','))).size).toBe(4);
		});
	}
});
