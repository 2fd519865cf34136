/**
 * The pole map's view and pole text. The poles used are those of the standard second-order
 * system ωn²/(s² + 2ζωn s + ωn²) with ζ = 0.6, ωn = 5 (Ogata, Modern Control Engineering, ch. 5,
 * from memory): −ζωn ± jωn√(1 − ζ²) = −3 ± 4j.
 */
import { describe, expect, it } from 'vitest';
import { formatComplex, poleList, poleView } from './poles';

const pair = [
	{ re: -3, im: 4 },
	{ re: -3, im: -4 }
];

describe('pole view', () => {
	it('frames the dominant pair with equal axis scales and shows the imaginary axis', () => {
		const v = poleView(pair, [], 0.5);
		expect(v.xMin).toBeLessThan(-3);
		expect(v.xMax).toBeGreaterThan(0);
		expect(v.yMax).toBeGreaterThanOrEqual(4);
		expect(v.yMin).toBe(-v.yMax);
		expect((v.yMax - v.yMin) / (v.xMax - v.xMin)).toBeCloseTo(0.5, 12);
	});

	it('leaves the far Padé poles out in the near view and takes them in with "all"', () => {
		const withFast = [...pair, { re: -400, im: 0 }];
		expect(poleView(withFast, [], 0.5).xMin).toBeGreaterThan(-400);
		expect(poleView(withFast, [], 0.5, 'all').xMin).toBeLessThan(-400);
	});

	it('widens for unstable poles and stays finite without poles', () => {
		expect(poleView([{ re: 2, im: 0 }], [], 0.5).xMax).toBeGreaterThan(2);
		const empty = poleView([], [], 0.5);
		for (const x of Object.values(empty)) expect(Number.isFinite(x)).toBe(true);
	});
});

describe('pole text', () => {
	it('writes a conjugate pair once, slowest first', () => {
		expect(poleList([{ re: -10, im: 0 }, ...pair])).toEqual({ items: ['−3 ± 4j', '−10'], more: 0 });
		expect(formatComplex({ re: -3, im: -4 })).toBe('−3 − 4j');
		expect(poleList([{ re: -1, im: 0 }, { re: -2, im: 0 }, { re: -3, im: 0 }], 2)).toEqual({ items: ['−1', '−2'], more: 1 });
	});
});
