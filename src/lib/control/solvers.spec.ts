import { describe, expect, it } from 'vitest';
import { brentMinimize, brentRoot, newtonBracketed } from './solvers';

// Check values are closed forms (common practice).
describe('scalar solvers', () => {
	it('Brent root: cos x = x at 0.7390851332151607 (the Dottie number), and null without a bracket', () => {
		expect(brentRoot((x) => Math.cos(x) - x, 0, 1, 1e-15) as number).toBeCloseTo(0.7390851332151607, 15);
		expect(brentRoot((x) => x * x + 1, -1, 1)).toBeNull();
	});
	it('safeguarded Newton: x³ − 2x − 5 = 0 at 2.0945514815423265 (Wallis’ cubic), from a wide bracket', () => {
		const r = newtonBracketed((x) => [x ** 3 - 2 * x - 5, 3 * x * x - 2], -3, 10) as number;
		expect(r).toBeCloseTo(2.0945514815423265, 14);
		expect(newtonBracketed((x) => [x * x + 1, 2 * x], -1, 1)).toBeNull();
	});
	it('Brent minimiser: (x − 2)² + 1 has its minimum 1 at 2', () => {
		const r = brentMinimize((x) => (x - 2) ** 2 + 1, 0, 5);
		expect(r.x).toBeCloseTo(2, 7);
		expect(r.fx).toBeCloseTo(1, 14);
	});
});
