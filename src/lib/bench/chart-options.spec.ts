/**
 * Chart helpers: tick text (plain numbers from 1e-3 to 1e6, otherwise the %g exponent form of
 * ISO C99 7.19.6.1 with 3 significant digits, as `formatSig` writes it) and the Bode window
 * (points up to 20 × the highest crossover: plain arithmetic on the inputs).
 */
import { describe, expect, it } from 'vitest';
import { bodeWindow, tickLabel } from './chart-options';

describe('tick labels', () => {
	it('writes plain numbers on ordinary axes and the minus sign U+2212', () => {
		expect(tickLabel(-2000)).toBe('−2000');
		expect(tickLabel(0.05)).toBe('0.05');
		expect(tickLabel(0)).toBe('0');
		expect(tickLabel(0.1 + 0.2)).toBe('0.3');
	});
	it('uses the exponent form for very small and very large values, and nothing for no value', () => {
		expect(tickLabel(2e-5)).toBe('2e−05');
		expect(tickLabel(3e7)).toBe('3e+07');
		expect(tickLabel(null)).toBe('');
		expect(tickLabel(Number.NaN)).toBe('');
	});
});

describe('Bode window', () => {
	const w = [0.01, 0.1, 1, 10, 100, 1000];
	it('keeps the points up to 20 × the highest crossover', () => {
		expect(bodeWindow(w, 0.5, 2)).toBe(4); // up to 40 rad/s
		expect(bodeWindow(w, 0.04, null)).toBe(2); // up to 0.8 rad/s
	});
	it('keeps everything without a crossover', () => {
		expect(bodeWindow(w, null, null)).toBe(6);
	});
});
