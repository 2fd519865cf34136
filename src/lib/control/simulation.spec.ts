import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { realize, simulateLoop } from './simulation';
import { controllerTerms } from './controller';
import { stepMetrics } from './metrics';
import type { ControllerSettings, TransferFunction } from './types';

function metricsOf(plant: TransferFunction, c: ControllerSettings, tEnd: number, points = 2000, finalValue = 1) {
	const sim = simulateLoop(plant, controllerTerms(c), { tEnd, points });
	const f = sim.fine;
	return { sim, m: stepMetrics({ t: f.t, y: f.setpoint.y, dy: f.setpoint.dy, u: f.setpoint.u }, finalValue, 0.02, 1, sim.mvImpulse).metrics };
}

describe('realisation', () => {
	it('reproduces the transfer function: C(sI − A)⁻¹B + D at s = 0 equals num(0)/den(0)', () => {
		const ss = realize([2, 3, 4], [1, 5, 6]);
		// DC gain −C·A⁻¹·B + D for (2s² + 3s + 4)/(s² + 5s + 6) is 4/6; A is 2×2 here.
		const [a, b, c, d] = [ss.a[0], ss.a[1], ss.a[2], ss.a[3]];
		const det = a * d - b * c;
		const inv = [d / det, -b / det, -c / det, a / det];
		const aiB = [inv[0] * ss.b[0] + inv[1] * ss.b[1], inv[2] * ss.b[0] + inv[3] * ss.b[1]];
		expect(ss.d - (ss.c[0] * aiB[0] + ss.c[1] * aiB[1])).toBeCloseTo(4 / 6, 14);
		expect(ss.d).toBe(2);
	});
});

// Exact closed-loop values of CONTROL-REFERENCE 5.2, W8–W10 ([C]; the book values are rounded).
describe('delay-free closed loops against standard second-order results', () => {
	it('ζ = 0.6, ωn = 5 (Ogata, Modern Control Engineering, §5-3 example): OS 9.47802 %, tp 0.785398, tr 0.370810, ts(2 %) 1.18860', () => {
		const { m, sim } = metricsOf({ num: [25], den: [1, 6, 0], delay: 0 }, { type: 'P', kp: 1 }, 5);
		expect(sim.method).toBe('exact-closed-loop');
		expect(m.overshootPercent as number).toBeCloseTo(9.47802, 5);
		expect(m.peakTime as number).toBeCloseTo(0.785398, 6);
		expect(m.riseTime as number).toBeCloseTo(0.37081, 5);
		expect(m.settlingTime as number).toBeCloseTo(1.1886, 4);
	});
	it('100/(s² + 15s + 100) (Nise, Control Systems Engineering, ch. 4 example): Tp 0.474964, %OS 2.83754, Tr 0.228754, Ts 0.574261', () => {
		const { m } = metricsOf({ num: [100], den: [1, 15, 0], delay: 0 }, { type: 'P', kp: 1 }, 3);
		expect(m.peakTime as number).toBeCloseTo(0.474964, 6);
		expect(m.overshootPercent as number).toBeCloseTo(2.83754, 5);
		expect(m.riseTime as number).toBeCloseTo(0.228754, 6);
		expect(m.settlingTime as number).toBeCloseTo(0.574261, 6);
	});
	it('(−s + 1)/(s² + s + 1) (python-control step_info docstring example; exact [C]): rise 1.266113, settling 8.993010, OS 20.8713 %, US 28.0187 %, peak 1.208713 at 4.232199', () => {
		// Unity feedback of (−s + 1)/(s² + 2s) gives (−s + 1)/(s² + s + 1).
		const { m } = metricsOf({ num: [-1, 1], den: [1, 2, 0], delay: 0 }, { type: 'P', kp: 1 }, 15);
		expect(m.riseTime as number).toBeCloseTo(1.266113, 5);
		expect(m.settlingTime as number).toBeCloseTo(8.99301, 4);
		expect(m.overshootPercent as number).toBeCloseTo(20.8713, 4);
		expect(m.undershootPercent as number).toBeCloseTo(28.0187, 4);
		expect(m.peak as number).toBeCloseTo(1.208713, 6);
		expect(m.peakTime as number).toBeCloseTo(4.232199, 5);
	});
	it('Ogata’s ZN PID on 1/(s(s+1)(s+5)), Kp = 18, Ti = Pu/2, Td = Pu/8, Pu = 2π/√5, derivative on the error: OS 61.8247 % at 1.667695 s, rise 0.577830 s, ts 10.0345 s (Ogata, ZN second method example: "about 62 %", from memory; [C] values of W7)', () => {
		const pu = (2 * Math.PI) / Math.sqrt(5);
		const { m } = metricsOf({ num: [1], den: [1, 6, 5, 0], delay: 0 }, { type: 'PID', kp: 18, ti: pu / 2, td: pu / 8, c: 1 }, 20);
		expect(m.overshootPercent as number).toBeCloseTo(61.8247, 3);
		expect(m.peakTime as number).toBeCloseTo(1.667695, 5);
		expect(m.riseTime as number).toBeCloseTo(0.57783, 5);
		expect(m.settlingTime as number).toBeCloseTo(10.0345, 3);
		expect(m.peakMv).toBeNull();
	});
	it('table 5.2 rows ζ = 0.5, ωn = 1 and ζ = 0.75, ωn = 10: Mp 16.3034 / 2.83754 %, Tp 3.62760 / 0.474964 s, tr 1.63757 / 0.228754 s, ts2 8.07635 / 0.574261 s ([C])', () => {
		const rows = [
			{ zeta: 0.5, wn: 1, mp: 16.3034, tp: 3.6276, tr: 1.63757, ts: 8.07635, tEnd: 20 },
			{ zeta: 0.75, wn: 10, mp: 2.83754, tp: 0.474964, tr: 0.228754, ts: 0.574261, tEnd: 2 }
		];
		for (const r of rows) {
			const { m } = metricsOf({ num: [r.wn * r.wn], den: [1, 2 * r.zeta * r.wn, 0], delay: 0 }, { type: 'P', kp: 1 }, r.tEnd);
			expect(m.overshootPercent as number).toBeCloseTo(r.mp, 4);
			expect(m.peakTime as number).toBeCloseTo(r.tp, 5);
			expect(m.riseTime as number).toBeCloseTo(r.tr, 5);
			expect(m.settlingTime as number).toBeCloseTo(r.ts, 4);
		}
	});
});

describe('dead time is simulated exactly', () => {
	it('an open-loop-like check: with a tiny P gain the PV starts moving exactly θ after the step', () => {
		const theta = 0.73;
		const sim = simulateLoop({ num: [1], den: [1, 1], delay: theta }, controllerTerms({ type: 'P', kp: 1e-3 }), { tEnd: 3, points: 301 });
		const f = sim.fine;
		for (let k = 0; k < f.t.length; k++) {
			if (f.t[k] <= theta + 1e-12) expect(f.setpoint.y[k]).toBe(0);
		}
		// Just after θ: y ≈ kp·(1 − e^(−(t − θ))) (the loop has not closed yet before 2θ).
		const k = f.t.findIndex((t) => t > theta + 0.5);
		expect(f.setpoint.y[k]).toBeCloseTo(1e-3 * (1 - Math.exp(-(f.t[k] - theta))), 9);
	});

	it('PV and MV converge as the grid is refined (2000 vs 20 000 points differ by < 1e-4)', () => {
		const plant = { num: [1.2], den: [4, 1], delay: 0.8 };
		const c: ControllerSettings = { type: 'PID', kp: 3, ti: 3, td: 0.4, n: 10 };
		const a = metricsOf(plant, c, 30, 2000).m;
		const b = metricsOf(plant, c, 30, 20000).m;
		expect(Math.abs((a.overshootPercent as number) - (b.overshootPercent as number))).toBeLessThan(1e-3);
		expect(Math.abs((a.riseTime as number) - (b.riseTime as number)) / (b.riseTime as number)).toBeLessThan(1e-4);
		expect(Math.abs((a.iae as number) - (b.iae as number)) / (b.iae as number)).toBeLessThan(1e-4);
	});

	it('the scalar kernels for up to six states and the indexed loops give the same responses (1e-12; with and without dead time, every size 1–6, every controller type, ideal derivative with c = 1)', () => {
		const delayed: TransferFunction[] = [
			{ num: [2], den: [5, 1], delay: 0.7 },
			{ num: [1], den: [1, 0], delay: 0.3 },
			{ num: [-0.5, 1], den: [2, 3, 1], delay: 0.45 },
			{ num: [1], den: [0.12, 0.79, 1.89, 2.6, 1], delay: 0.4 }
		];
		const plants = [...delayed, ...delayed.map((p) => ({ ...p, delay: 0 }))];
		const controllers: ControllerSettings[] = [
			{ type: 'P', kp: 0.8 },
			{ type: 'PI', kp: 0.9, ti: 3 },
			{ type: 'PD', kp: 0.7, td: 0.2, n: 8 },
			{ type: 'PID', kp: 1.2, ti: 2.4, td: 0.3, n: 10, b: 0.6 },
			{ type: 'PID', kp: 0.6, ti: 2, td: 0.2, c: 1 }
		];
		let cases = 0;
		for (const plant of plants)
			for (const c of controllers) {
				const terms = controllerTerms(c);
				const fast = simulateLoop(plant, terms, { tEnd: 25, points: 700 });
				const slow = simulateLoop(plant, terms, { tEnd: 25, points: 700, genericKernel: true });
				expect(fast.method).toBe(plant.delay > 0 ? 'delay-line' : 'exact-closed-loop');
				expect(fast.truncatedAt).toBe(slow.truncatedAt);
				for (const key of ['setpoint', 'disturbance'] as const)
					for (const series of ['y', 'u'] as const) {
						const a = fast[key][series];
						const b = slow[key][series];
						expect(a.length).toBe(b.length);
						const scale = Math.max(1, ...Array.from(b, Math.abs));
						for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-12 * scale);
					}
				cases++;
			}
		expect(cases).toBe(40);
	});
	it('neglects a dead time below 1/64 of the sample spacing and says so', () => {
		const sim = simulateLoop({ num: [1], den: [1, 1], delay: 1e-6 }, controllerTerms({ type: 'PI', kp: 1, ti: 1 }), { tEnd: 10, points: 100 });
		expect(sim.method).toBe('exact-closed-loop');
		expect(sim.notes.join(' ')).toMatch(/neglects/);
	});

	it('cuts a diverging response and reports where', () => {
		const sim = simulateLoop({ num: [1.2], den: [4, 1], delay: 0.8 }, controllerTerms({ type: 'P', kp: 20 }), { tEnd: 500, points: 2000, limit: 1e6 });
		expect(sim.truncatedAt).not.toBeNull();
		expect(sim.t.length).toBeLessThan(2000);
		for (const v of sim.setpoint.y) expect(Number.isFinite(v)).toBe(true);
	});
});

describe('simulation properties', () => {
	it('the PV settles at the closed-loop DC gain (final value theorem) for random stable FOPDT + PI loops', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 0.2, max: 5, noNaN: true }),
				fc.double({ min: 0.5, max: 10, noNaN: true }),
				fc.double({ min: 0, max: 2, noNaN: true }),
				fc.double({ min: 0.2, max: 0.6, noNaN: true }),
				fc.double({ min: 0.2, max: 1.5, noNaN: true }),
				(k, tau, theta, gainRatio, tiRatio) => {
					// Conservative settings: kp·k ≤ 0.6·τ/(τ+θ)-ish keeps these loops stable.
					const kp = (gainRatio * tau) / (k * (tau + theta + 0.01));
					const ti = tiRatio * tau;
					const sim = simulateLoop({ num: [k], den: [tau, 1], delay: theta }, controllerTerms({ type: 'PI', kp, ti }), { tEnd: 80 * (tau + theta), points: 1500 });
					const y = sim.setpoint.y;
					expect(Math.abs(y[y.length - 1] - 1)).toBeLessThan(2e-3);
					// Load disturbance rejected by the integral action (DC gain of d → y is 0).
					const yd = sim.disturbance.y;
					expect(Math.abs(yd[yd.length - 1])).toBeLessThan(2e-3 * k);
				}
			),
			{ numRuns: 60, seed: 17 }
		);
	});
});
