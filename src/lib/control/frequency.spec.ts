import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analysisGrid, bode, evaluateLoop, frequencyRange, logspace, loopLogMagnitude, loopModel, loopModelFromFactors, loopPhase, stabilityMargins } from './frequency';
import { controllerPolynomials, controllerTerms } from './controller';
import { polyMul } from './polynomial';
import { tfEval } from './transfer-function';
import type { ControllerSettings } from './types';

function loopOf(num: number[], den: number[], delay: number, c: ControllerSettings) {
	const { nc, dc } = controllerPolynomials(controllerTerms(c));
	return loopModel(polyMul(nc, num), polyMul(dc, den), delay);
}
function margins(num: number[], den: number[], delay: number, c: ControllerSettings) {
	const m = loopOf(num, den, delay, c);
	const r = frequencyRange(m);
	return stabilityMargins(m, analysisGrid(m, logspace(r.wMin, r.wMax, 400)));
}

describe('Bode data', () => {
	it('first order 1/(s+1) at the corner: −3.0103 dB, −45° (standard, e.g. Ogata §7-2)', () => {
		const b = bode(loopModel([1], [1, 1]), [1]);
		expect(b.magDb[0]).toBeCloseTo(-10 * Math.log10(2), 12);
		expect(b.phaseDeg[0]).toBeCloseTo(-45, 12);
	});
	it('adds the exact delay phase −ωθ and unwraps: e^(−s)/(s+1) at ω = 10 is −84.29° − 572.96°', () => {
		const b = bode(loopModel([1], [1, 1], 1), [10]);
		expect(b.phaseDeg[0]).toBeCloseTo((-Math.atan(10) * 180) / Math.PI - (10 * 180) / Math.PI, 10);
	});
	it('starts near 0, −90, −180, −270° for types 0…3', () => {
		for (let type = 0; type <= 3; type++) {
			const den = [1, 1, ...Array(type).fill(0)];
			const b = bode(loopModel([1], den), [1e-4]);
			expect(b.phaseDeg[0]).toBeCloseTo(-90 * type, 1);
		}
	});
	it('keeps a continuous phase through a lightly damped resonance', () => {
		const m = loopModel([1], [1, 0.02, 1]);
		const w = logspace(0.1, 10, 400);
		const b = bode(m, w);
		for (let i = 1; i < w.length; i++) expect(Math.abs(b.phaseDeg[i] - b.phaseDeg[i - 1])).toBeLessThan(90);
		expect(b.phaseDeg[w.length - 1]).toBeCloseTo(-180, 0);
	});
});

describe('phase of paired and right-half-plane factors', () => {
	// Reference: the phase of a product is the sum of the factor phases, each factor jω − r taken on
	// its continuous branch (common practice; e.g. Franklin, Powell & Emami-Naeini, Feedback Control
	// of Dynamic Systems, §6.1, from memory). Here summed one factor at a time with atan2, which is
	// continuous for a root in the left half-plane.
	const perFactor = (zeros: { re: number; im: number }[], poles: { re: number; im: number }[], w: number) =>
		zeros.reduce((a, z) => a + Math.atan2(w - z.im, -z.re), 0) - poles.reduce((a, p) => a + Math.atan2(w - p.im, -p.re), 0);
	it('left-half-plane factors evaluated in pairs give the per-factor sum (random roots, 1e-9)', () => {
		const root = fc.record({ re: fc.double({ min: -50, max: -1e-3, noNaN: true }), im: fc.double({ min: -50, max: 50, noNaN: true }) });
		fc.assert(
			fc.property(fc.array(root, { maxLength: 7 }), fc.array(root, { minLength: 1, maxLength: 8 }), fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (zeros, poles, w) => {
				const m = loopModelFromFactors(1, zeros, poles);
				const lowRef = perFactor(zeros, poles, Math.min(...m.corners) * 1e-3);
				const offset = loopPhase(m, Math.min(...m.corners) * 1e-3) - lowRef;
				expect(Math.abs(offset / (2 * Math.PI) - Math.round(offset / (2 * Math.PI)))).toBeLessThan(1e-9);
				expect(loopPhase(m, w) - offset).toBeCloseTo(perFactor(zeros, poles, w), 9);
			}),
			{ seed: 20261201, numRuns: 300 }
		);
	});
	it('a complex right-half-plane zero pair: no 360° jump; the numerator of (s² − 0.4s + 4)/(s + 1)³ turns 0 → −180°, the loop ends at −450° (asymptotes, common practice)', () => {
		const m = loopModel([1, -0.4, 4], [1, 3, 3, 1]);
		const w = logspace(1e-3, 1e3, 2000);
		const b = bode(m, w);
		for (let i = 1; i < w.length; i++) expect(Math.abs(b.phaseDeg[i] - b.phaseDeg[i - 1])).toBeLessThan(10);
		expect(b.phaseDeg[0]).toBeCloseTo(0, 0);
		expect(b.phaseDeg[w.length - 1]).toBeCloseTo(-450, 0);
	});
	it('log-magnitude from running products matches the sum of logarithms, also for factors far apart in size', () => {
		const zeros = [{ re: -1e-140, im: 0 }, { re: -1e150, im: 0 }, { re: -3, im: 4 }, { re: -3, im: -4 }];
		const poles = [{ re: -1e-120, im: 0 }, { re: -1e145, im: 0 }, { re: -2, im: 0 }, { re: -5, im: 1 }, { re: -5, im: -1 }];
		const m = loopModelFromFactors(2.5, zeros, poles);
		for (const w of [1e-150, 1e-3, 1, 7, 1e4, 1e149]) {
			const sum = (rs: typeof zeros) => rs.reduce((a, r) => a + Math.log(Math.hypot(w - r.im, r.re)), 0);
			const ref = Math.log(2.5) + sum(zeros) - sum(poles);
			expect(loopLogMagnitude(m, w)).toBeCloseTo(Math.max(-700, Math.min(700, ref)), 9);
		}
	});
});

describe('log-spaced grid', () => {
	it('equals exp(a + (b − a)·i/(n − 1)) to 1e-13 (an ulp of an exponent near ±20 is already 1e-15 relative) and hits both ends (the definition; common practice)', () => {
		for (const [lo, hi, n] of [[1e-3, 1e4, 400], [0.5, 2, 7], [1e-9, 1e9, 1001]] as const) {
			const w = logspace(lo, hi, n);
			const a = Math.log(lo);
			const b = Math.log(hi);
			for (let i = 0; i < n; i++) expect(Math.abs(w[i] / Math.exp(a + ((b - a) * i) / (n - 1)) - 1)).toBeLessThan(1e-13);
			expect(w[0] / lo).toBeCloseTo(1, 14);
			expect(w[n - 1] / hi).toBeCloseTo(1, 13);
		}
	});
});

describe('grid evaluation', () => {
	it('carries the phase along the grid to the factor-by-factor value (1e-9 rad) and gives the same log-magnitude (1e-12): random roots in both half-planes, on the axis, lightly damped, at the origin, with dead time', () => {
		const rootArb = fc.oneof(
			fc.record({ re: fc.double({ min: -30, max: -1e-3, noNaN: true }), im: fc.constant(0) }),
			fc.record({ re: fc.double({ min: 1e-3, max: 5, noNaN: true }), im: fc.constant(0) }),
			fc.record({ re: fc.double({ min: -0.05, max: -1e-4, noNaN: true }), im: fc.double({ min: 0.1, max: 20, noNaN: true }) }),
			fc.record({ re: fc.double({ min: 0.01, max: 3, noNaN: true }), im: fc.double({ min: 0.1, max: 10, noNaN: true }) }),
			fc.record({ re: fc.constant(0), im: fc.double({ min: 0.2, max: 8, noNaN: true }) }),
			fc.constant({ re: 0, im: 0 })
		);
		// Complex roots come with their conjugates, as in a real polynomial.
		const withConjugates = (rs: { re: number; im: number }[]) => rs.flatMap((r) => (r.im === 0 ? [r] : [r, { re: r.re, im: -r.im }]));
		fc.assert(
			fc.property(fc.array(rootArb, { maxLength: 4 }), fc.array(rootArb, { minLength: 1, maxLength: 5 }), fc.double({ min: 0, max: 3, noNaN: true }), fc.boolean(), (zs, ps, delay, negative) => {
				const m = loopModelFromFactors(negative ? -2 : 2, withConjugates(zs), withConjugates(ps), delay);
				const r = frequencyRange(m);
				const grid = analysisGrid(m, logspace(r.wMin, r.wMax, 400));
				const v = evaluateLoop(m, grid);
				for (let i = 0; i < grid.length; i++) {
					const ref = loopPhase(m, grid[i]);
					expect(Math.abs(v.lm[i] - loopLogMagnitude(m, grid[i])), `log|L| at ω = ${grid[i]}`).toBeLessThan(1e-12 * Math.max(1, Math.abs(v.lm[i])));
					if (!Number.isFinite(ref)) continue;
					expect(Math.abs(v.ph[i] - ref), `ω = ${grid[i]}`).toBeLessThan(1e-9 * Math.max(1, Math.abs(ref)));
				}
			}),
			{ seed: 4711, numRuns: 300 }
		);
		// 300 models × 400+ points, each checked against the pointwise phase: seconds on a busy machine.
	}, 30_000);
});

describe('grid evaluation on a coarse grid', () => {
	it('does not carry the phase across two lightly damped pole pairs between two points (the phase turns by almost 2π there): it evaluates factor by factor', () => {
		const poles = [
			{ re: -0.001, im: 1 },
			{ re: -0.001, im: -1 },
			{ re: -0.0012, im: 1.0001 },
			{ re: -0.0012, im: -1.0001 }
		];
		const m = loopModelFromFactors(1, [], poles);
		const grid = [0.5, 0.9, 1.1, 2];
		const v = evaluateLoop(m, grid);
		grid.forEach((w, i) => expect(Math.abs(v.ph[i] - loopPhase(m, w)), `ω = ${w}`).toBeLessThan(1e-12));
		// Across the resonance the true phase falls by about 2π (two pairs, −π each).
		expect(v.ph[2] - v.ph[1]).toBeLessThan(-6);
	});
});

describe('automatic frequency band', () => {
	it('a corner one rounding error off a power of ten gives the band of the exact value (two decades either side)', () => {
		const band = (r: number) => frequencyRange(loopModelFromFactors(1, [], [{ re: -r, im: 0 }, { re: -2, im: 0 }]));
		for (const r of [1 - 2 * Number.EPSILON, 1, 1 + 2 * Number.EPSILON]) {
			const b = band(r);
			expect(b.wMin).toBeCloseTo(0.01, 15);
			expect(b.wMax / 1000).toBeCloseTo(1, 12);
		}
	});
});

describe('margins against published and exact values', () => {
	it('SIMC PI on an FOPDT with τc = θ, τ1 ≤ 8θ: GM = π at π/(2θ), PM = 61.3521° at 1/(2θ), Ms = 1.590490, delay margin 2.141593θ (Skogestad 2003, paper values 3.14, 61.4°, 1.59 from memory; exact [C] values of CONTROL-REFERENCE W5)', () => {
		const theta = 0.8;
		const m = margins([1], [4, 1], theta, { type: 'PI', kp: 4 / (2 * theta), ti: 4 });
		expect(m.gainMargin as number).toBeCloseTo(Math.PI, 10);
		expect(m.phaseCrossover as number).toBeCloseTo(Math.PI / (2 * theta), 10);
		expect(m.phaseMargin as number).toBeCloseTo(61.3521, 4);
		expect(m.gainCrossover as number).toBeCloseTo(1 / (2 * theta), 10);
		expect(m.ms as number).toBeCloseTo(1.59049, 5);
		expect((m.msFrequency as number) * theta).toBeCloseTo(1.1442, 3);
		expect((m.delayMargin as number) / theta).toBeCloseTo(2.141593, 6);
	});
	it('SIMC PI on an IPDT (Ti = 8θ): GM 2.963402, PM 46.8643°, Ms 1.703522, delay margin 1.589637θ (Skogestad 2003 [M]; W6 [C])', () => {
		const theta = 2;
		const kv = 0.5;
		const m = margins([kv], [1, 0], theta, { type: 'PI', kp: 1 / (2 * kv * theta), ti: 8 * theta });
		expect(m.gainMargin as number).toBeCloseTo(2.963402, 6);
		expect((m.phaseCrossover as number) * theta).toBeCloseTo(1.486928, 6);
		expect(m.phaseMargin as number).toBeCloseTo(46.8643, 4);
		expect((m.gainCrossover as number) * theta).toBeCloseTo(0.514543, 6);
		expect(m.ms as number).toBeCloseTo(1.703522, 6);
		expect((m.delayMargin as number) / theta).toBeCloseTo(1.589637, 6);
	});
	it('PI rules on the FOPDT K = 1.2, τ = 4, θ = 0.8: AMIGO (1.00463, 3.10609) GM 6.328, PM 67.52°, Ms 1.2638; ZN step (3.75, 2.4) GM 1.623, PM 28.91°, Ms 3.088 (CONTROL-REFERENCE table after 2.11, [C])', () => {
		const amigo = margins([1.2], [4, 1], 0.8, { type: 'PI', kp: 1.00463, ti: 3.10609 });
		expect(amigo.gainMargin as number).toBeCloseTo(6.328, 3);
		expect(amigo.phaseMargin as number).toBeCloseTo(67.52, 2);
		expect(amigo.ms as number).toBeCloseTo(1.2638, 4);
		const zn = margins([1.2], [4, 1], 0.8, { type: 'PI', kp: 3.75, ti: 2.4 });
		expect(zn.gainMargin as number).toBeCloseTo(1.623, 3);
		expect(zn.phaseMargin as number).toBeCloseTo(28.91, 2);
		expect(zn.ms as number).toBeCloseTo(3.088, 3);
	});
	it('Ogata’s 1/(s(s+1)(s+5)): phase crossover at √5 with GM = 30/K (Ku = 30; Ogata ZN example, W7)', () => {
		const m = margins([1], [1, 6, 5, 0], 0, { type: 'P', kp: 10 });
		expect(m.phaseCrossover as number).toBeCloseTo(Math.sqrt(5), 10);
		expect(m.gainMargin as number).toBeCloseTo(3, 10);
		expect(m.gainMarginDb as number).toBeCloseTo(20 * Math.log10(3), 10);
	});
	it('an integrator k/s: PM 90° at ω = k, no phase crossover → GM null with the reason', () => {
		const m = margins([2], [1, 0], 0, { type: 'P', kp: 1 });
		expect(m.gainCrossover as number).toBeCloseTo(2, 12);
		expect(m.phaseMargin as number).toBeCloseTo(90, 10);
		expect(m.gainMargin).toBeNull();
		expect(m.reasons.gainMargin).toMatch(/no phase crossover/);
	});
	it('|L| < 1 everywhere: PM null, delay margin null with "infinite"', () => {
		const m = margins([0.5], [1, 1], 0, { type: 'P', kp: 1 });
		expect(m.phaseMargin).toBeNull();
		expect(m.reasons.delayMargin).toMatch(/infinite/);
		expect(m.ms as number).toBeCloseTo(1, 6);
	});
	it('lists all crossings of a lightly damped loop (two gain crossovers around the resonance)', () => {
		// L = 0.3/(s² + 0.04 s + 1): |L| peaks at 7.5 near ω = 1, so |L| crosses 1 twice.
		const m = margins([0.3], [1, 0.04, 1], 0, { type: 'P', kp: 1 });
		expect(m.gainCrossings).toHaveLength(2);
		const [a, b] = m.gainCrossings.map((g) => g.w).sort((x, y) => x - y);
		// |L(jω)| = 1 ⇔ (1 − ω²)² + (0.04ω)² = 0.09 (solved exactly).
		const check = (w: number) => Math.abs((1 - w * w) ** 2 + (0.04 * w) ** 2 - 0.09);
		expect(check(a)).toBeLessThan(1e-10);
		expect(check(b)).toBeLessThan(1e-10);
	});
});

describe('margins: properties', () => {
	it('Ms bounds the margins: GM ≥ Ms/(Ms − 1), PM ≥ 2·arcsin(1/(2Ms)) (geometric result, CONTROL-REFERENCE 5.3 [M, formula checked C])', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0.5, max: 10, noNaN: true }),
				fc.double({ min: 0.5, max: 10, noNaN: true }),
				fc.double({ min: 0.05, max: 3, noNaN: true }),
				fc.double({ min: 0.1, max: 5, noNaN: true }),
				fc.double({ min: 0.5, max: 20, noNaN: true }),
				(k, tau, theta, kp, ti) => {
					const m = margins([k], [tau, 1], theta, { type: 'PI', kp, ti });
					if (m.ms === null) return;
					if (m.gainMargin !== null && m.gainMargin > 1) expect(m.gainMargin).toBeGreaterThanOrEqual((m.ms / (m.ms - 1)) * (1 - 1e-9));
					if (m.phaseMargin !== null && m.phaseMargin > 0) expect(m.phaseMargin).toBeGreaterThanOrEqual(((2 * Math.asin(1 / (2 * m.ms)) * 180) / Math.PI) * (1 - 1e-9));
				}
			),
			{ numRuns: 1000, seed: 3 }
		);
	});

	it('Ms agrees with a brute-force scan of |1 + L(jω)| on 100 000 frequencies (direct polynomial evaluation with the exact delay)', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0.5, max: 5, noNaN: true }),
				fc.double({ min: 0.2, max: 10, noNaN: true }),
				fc.double({ min: 0.05, max: 3, noNaN: true }),
				fc.double({ min: 0.05, max: 3, noNaN: true }),
				fc.double({ min: 0.2, max: 10, noNaN: true }),
				(k, tau, tau2, theta, ti) => {
					const num = [k];
					const den = [tau * tau2, tau + tau2, 1];
					const c: ControllerSettings = { type: 'PID', kp: (0.6 * tau) / (k * (theta + tau2)), ti, td: 0.5 * tau2, n: 10 };
					const { nc, dc } = controllerPolynomials(controllerTerms(c));
					const m = loopModel(polyMul(nc, num), polyMul(dc, den), theta);
					const r = frequencyRange(m);
					const res = stabilityMargins(m, analysisGrid(m, logspace(r.wMin, r.wMax, 400)));
					const loop = { num: polyMul(nc, num), den: polyMul(dc, den), delay: theta };
					let minDist = Infinity;
					const w = logspace(r.wMin, r.wMax, 100000);
					for (const x of w) {
						const l = tfEval(loop, 0, x);
						minDist = Math.min(minDist, Math.hypot(1 + l.re, l.im));
					}
					if (res.ms === null) return;
					expect(res.ms).toBeGreaterThanOrEqual((1 / minDist) * (1 - 1e-9));
					expect(res.ms).toBeLessThanOrEqual((1 / minDist) * (1 + 2e-3));
				}
			),
			{ numRuns: 25, seed: 43 }
		);
	});
});
