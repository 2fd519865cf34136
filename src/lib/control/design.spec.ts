import { describe, expect, it } from 'vitest';
import {
	DesignError,
	dampingFromOvershoot,
	designController,
	naturalFrequencyFromSettlingTime,
	overshootFromDamping,
	type DesignPlant,
	type DesignRequest,
	type DesignResult
} from './design';
import reference from './fixtures/tuning-reference.json';

const D = reference.design;

// ---- independent polynomial algebra for the checks (descending coefficients) ----
function polymul(a: number[], b: number[]): number[] {
	const out = new Array(a.length + b.length - 1).fill(0);
	a.forEach((x, i) => b.forEach((y, j) => (out[i + j] += x * y)));
	return out;
}
function polyadd(a: number[], b: number[]): number[] {
	const n = Math.max(a.length, b.length);
	const pa = [...new Array(n - a.length).fill(0), ...a];
	const pb = [...new Array(n - b.length).fill(0), ...b];
	return pa.map((x, i) => x + pb[i]);
}
function plantPolys(p: DesignPlant): { num: number[]; den: number[] } {
	if (p.structure === 'fopdt') return { num: [p.k], den: [p.tau!, 1] };
	if (p.structure === 'sopdt') return { num: [p.k], den: polymul([p.tau!, 1], [p.tau2!, 1]) };
	return { num: [p.k * p.wn! * p.wn!], den: [1, 2 * p.zeta! * p.wn!, p.wn! * p.wn!] };
}
/** Monic closed-loop characteristic polynomial den_C·den_G + num_C·num_G of the ideal PID. */
function closedLoopCharacteristic(p: DesignPlant, res: DesignResult): number[] {
	const { kp, ti, td } = res.ideal;
	// C = kp(ti·td s² + ti s + 1)/(ti s) with I; kp(td s + 1) without.
	const numC = ti !== null ? [kp * ti * (td ?? 0), kp * ti, kp] : [kp * (td ?? 0), kp];
	const denC = ti !== null ? [ti, 0] : [1];
	const g = plantPolys(p);
	let ch = polyadd(polymul(denC, g.den), polymul(numC, g.num));
	while (ch.length > 1 && Math.abs(ch[0]) < 1e-14 * Math.max(...ch.map(Math.abs))) ch = ch.slice(1);
	return ch.map((c) => c / ch[0]);
}
/** Monic polynomial with the given real/complex-pair roots. */
function fromRoots(roots: { re: number; im: number }[]): number[] {
	let re = [1];
	let im = [0];
	for (const r of roots) {
		// (s − r)·(re + j im)
		const nre = polyadd(polymul(re, [1, -r.re]), polymul(im, [0, r.im]));
		const nim = polyadd(polymul(im, [1, -r.re]), polymul(re, [0, -r.im]));
		re = nre;
		im = nim;
	}
	return re;
}
function expectCoefficients(actual: number[], expected: number[], digits = 9): void {
	expect(actual.length).toBe(expected.length);
	actual.forEach((c, i) => expect(c).toBeCloseTo(expected[i], digits));
}
function sortedPoles(poles: { re: number; im: number }[]): number[][] {
	return poles.map((p) => [p.re, p.im]).sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

describe('ζ, overshoot and settling time (standard second-order formulas)', () => {
	it('converts overshoot ↔ ζ', () => {
		// Ogata, Modern Control Engineering, ch. 5: Mp = exp(−ζπ/√(1−ζ²)) (from memory); fixture
		// design.overshoot [C] and reference sheet 5.2 (ζ = 0.6 ↔ 9.47802 %, ζ = 0.5 ↔ 16.3034 %).
		for (const { percent, zeta } of D.overshoot) expect(dampingFromOvershoot(percent)).toBeCloseTo(zeta, 12);
		expect(overshootFromDamping(0.6)).toBeCloseTo(9.47802, 5);
		expect(overshootFromDamping(0.5)).toBeCloseTo(16.3034, 4);
		expect(dampingFromOvershoot(0)).toBe(1);
		expect(overshootFromDamping(1.2)).toBe(0);
	});

	it('uses Ts ≈ 4/(ζωn) for the 2 % band', () => {
		// Ogata / Nise envelope estimate (reference sheet 5.2: ζ = 0.6, ωn = 5 → 1.33333 s).
		expect(naturalFrequencyFromSettlingTime(4 / 3, 0.6)).toBeCloseTo(5, 12);
		expect(() => naturalFrequencyFromSettlingTime(2, 1.5)).toThrow(/underdamped/);
		expect(() => dampingFromOvershoot(100)).toThrow(DesignError);
	});
});

describe('pole placement: the closed loop has the requested poles', () => {
	it('PI on a first-order plant (Åström & Murray PI pole placement)', () => {
		// Åström & Murray, Feedback Systems, 2nd ed.: for b/(s+a), kp = (2ζω0 − a)/b, ki = ω0²/b
		// (from memory, not verified against the book); fixture design.firstOrderPI [C] from a
		// numpy.linalg.solve coefficient match: Kc = 2.3, Ti = 1.4375 for K = 2, τ = 5, ζ = 0.7, ωn = 0.8.
		const f = D.firstOrderPI;
		const plant: DesignPlant = { structure: 'fopdt', ...f.plant };
		const res = designController({ plant, controller: 'PI', target: { zeta: f.zeta, wn: f.wn } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 12);
		expect(res.ideal.ti).toBeCloseTo(f.ti, 12);
		expect(res.ideal.kp / res.ideal.ti!).toBeCloseTo((f.wn * f.wn) / (f.plant.k / f.plant.tau), 12);
		const expected = [1, 2 * f.zeta * f.wn, f.wn * f.wn];
		expectCoefficients(closedLoopCharacteristic(plant, res), expected, 12);
		expectCoefficients(res.characteristic, expected, 12);
		expect(sortedPoles(res.closedLoopPoles)).toEqual(
			f.poles.map(([re, im]) => [expect.closeTo(re, 12), expect.closeTo(im, 12)])
		);
	});

	it('P on a first-order plant: pole at −4/Ts', () => {
		// Fixture design.firstOrderP [C]: K = 2, τ = 5, Ts = 2 → pole −2, Kc = 4.5.
		const f = D.firstOrderP;
		const plant: DesignPlant = { structure: 'fopdt', ...f.plant };
		const res = designController({ plant, controller: 'P', target: { settlingTime: f.settlingTime } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 12);
		expectCoefficients(closedLoopCharacteristic(plant, res), [1, 2], 12);
		// Steady-state error 1/(1 + K·Kc) = 1/10 (final value theorem).
		expect(res.warnings.join(' ')).toMatch(/steady-state error of 10 %/);
	});

	it('PD on two lags', () => {
		// Fixture design.secondOrderPD [C]: K = 1, τ1 = 4, τ2 = 1, ζ = 0.6, ωn = 2 → Kc = 15, Td = 0.306667.
		const f = D.secondOrderPD;
		const plant: DesignPlant = { structure: 'sopdt', ...f.plant };
		const res = designController({ plant, controller: 'PD', target: { zeta: f.zeta, wn: f.wn } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 10);
		expect(res.ideal.td).toBeCloseTo(f.td!, 12);
		expectCoefficients(closedLoopCharacteristic(plant, res), [1, 2 * f.zeta * f.wn, f.wn * f.wn], 10);
	});

	it('PI on two lags: the third pole is fixed by the plant', () => {
		// Fixture design.secondOrderPI [C]: third pole −(a1 − 2ζωn) = −1.53333 solved as an unknown.
		const f = D.secondOrderPI;
		const plant: DesignPlant = { structure: 'sopdt', ...f.plant };
		const res = designController({ plant, controller: 'PI', target: { zeta: f.zeta, wn: f.wn } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 12);
		expect(res.ideal.ti).toBeCloseTo(f.ti!, 12);
		const third = res.closedLoopPoles.find((p) => p.im === 0)!;
		expect(third.re).toBeCloseTo(f.extraPole!, 12);
		expectCoefficients(closedLoopCharacteristic(plant, res), fromRoots(res.closedLoopPoles), 12);
		expectCoefficients(res.characteristic, fromRoots(res.closedLoopPoles), 12);
	});

	it('P on two lags sets ζ; the speed follows from the plant', () => {
		// Fixture design.secondOrderP [C]: a1 = 2.5 → ωn = 2.5 for ζ = 0.5, Kc = 5.25.
		const f = D.secondOrderP;
		const plant: DesignPlant = { structure: 'sopdt', ...f.plant };
		const res = designController({ plant, controller: 'P', target: { zeta: f.zeta, wn: 1 } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 12);
		expect(res.target.wn).toBeCloseTo(f.wn, 12);
		expectCoefficients(closedLoopCharacteristic(plant, res), [1, 2 * f.zeta * f.wn, f.wn * f.wn], 12);
		expect(res.warnings.join(' ')).toMatch(/cannot set both/);
	});

	it('PID on a standard second-order plant with the third pole at 5·ζωn', () => {
		// Fixture design.standardPID [C]: K = 2, ωn = 1.5, ζ = 0.3; target ζ = 0.7, ωn = 3, p = 10.5.
		const f = D.standardPID;
		const plant: DesignPlant = { structure: 'second_order', ...f.plant, theta: 0.1 };
		const res = designController({ plant, controller: 'PID', target: { zeta: f.zeta, wn: f.wn } });
		expect(res.ideal.kp).toBeCloseTo(f.kp, 10);
		expect(res.ideal.ti).toBeCloseTo(f.ti!, 12);
		expect(res.ideal.td).toBeCloseTo(f.td!, 12);
		const expected = polymul([1, 2 * f.zeta * f.wn, f.wn * f.wn], [1, f.extraPoleFactor * f.zeta * f.wn]);
		expectCoefficients(closedLoopCharacteristic(plant, res), expected, 10);
		expect(sortedPoles(res.closedLoopPoles)).toEqual(
			f.poles.map(([re, im]) => [expect.closeTo(re, 10), expect.closeTo(im, 10)])
		);
		expect(res.warnings.join(' ')).toMatch(/delay-free part/);
	});

	it('places the poles for random reachable targets (PD / PI / PID on two lags, PI on one lag)', () => {
		// Property check against the independent expansion above (no external values needed).
		let seed = 7;
		const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
		let checked = 0;
		for (let i = 0; i < 300; i++) {
			const plant: DesignPlant =
				i % 2 === 0
					? { structure: 'sopdt', k: 0.2 + 5 * rand(), tau: 0.5 + 10 * rand(), tau2: 0.1 + 3 * rand() }
					: { structure: 'fopdt', k: -(0.2 + 5 * rand()), tau: 0.5 + 10 * rand() };
			const controller = plant.structure === 'fopdt' ? 'PI' : (['PD', 'PI', 'PID'] as const)[i % 3];
			const req: DesignRequest = { plant, controller, target: { zeta: 0.3 + 0.6 * rand(), wn: 0.2 + 5 * rand() } };
			let res: DesignResult;
			try {
				res = designController(req);
			} catch (e) {
				expect(e).toBeInstanceOf(DesignError);
				expect((e as DesignError).code).toBe('unreachable');
				continue;
			}
			checked++;
			expectCoefficients(closedLoopCharacteristic(plant, res), fromRoots(res.closedLoopPoles), 7);
		}
		expect(checked).toBeGreaterThan(150);
	});
});

describe('unreachable targets and bad requests', () => {
	function expectDesignError(req: DesignRequest, code: string, field: string | null, message: RegExp): void {
		try {
			designController(req);
			expect.unreachable();
		} catch (e) {
			expect(e).toBeInstanceOf(DesignError);
			expect((e as DesignError).code).toBe(code);
			expect((e as DesignError).field).toBe(field);
			expect((e as DesignError).message).toMatch(message);
		}
	}
	const fo: DesignPlant = { structure: 'fopdt', k: 2, tau: 5 };
	const so: DesignPlant = { structure: 'sopdt', k: 1, tau: 4, tau2: 1 };

	it('reports targets that need negative gains or times', () => {
		expectDesignError({ plant: fo, controller: 'PI', target: { zeta: 0.7, wn: 0.1 } }, 'unreachable', 'target.wn', /exceed half/);
		expectDesignError({ plant: fo, controller: 'P', target: { settlingTime: 40 } }, 'unreachable', 'target.settlingTime', /not faster/);
		expectDesignError({ plant: so, controller: 'PD', target: { zeta: 0.6, wn: 0.3 } }, 'unreachable', 'target.wn', /open-loop ωn/);
		expectDesignError({ plant: so, controller: 'PD', target: { zeta: 0.2, wn: 1 } }, 'unreachable', 'target.zeta', /negative derivative/);
		expectDesignError({ plant: so, controller: 'PI', target: { zeta: 0.7, settlingTime: 2 } }, 'unreachable', 'target.settlingTime', /2ζωn </);
		expectDesignError({ plant: so, controller: 'P', target: { zeta: 1.5 } }, 'unreachable', 'target.zeta', /only lower the damping/);
	});

	it('refuses structures that cannot place the poles', () => {
		expectDesignError({ plant: fo, controller: 'PD', target: { zeta: 0.7, wn: 1 } }, 'structure', 'controller', /single closed-loop pole/);
		expectDesignError({ plant: fo, controller: 'PID', target: { zeta: 0.7, wn: 1 } }, 'structure', 'controller', /use PI/);
	});

	it('names missing and bad fields', () => {
		expectDesignError({ plant: so, controller: 'PID', target: { wn: 1 } }, 'invalid', 'target.zeta', /ζ or the overshoot/);
		expectDesignError({ plant: so, controller: 'PID', target: { zeta: 0.5 } }, 'invalid', 'target.settlingTime', /settling time or ωn/);
		expectDesignError({ plant: so, controller: 'PID', target: { zeta: 0.5, overshootPercent: 5, wn: 1 } }, 'invalid', 'target.overshootPercent', /not both/);
		expectDesignError({ plant: { structure: 'sopdt', k: 1, tau: 4 }, controller: 'PD', target: { zeta: 0.5, wn: 1 } }, 'invalid', 'plant.tau2', /τ2/);
		expectDesignError({ plant: { ...so, k: Number.POSITIVE_INFINITY }, controller: 'PD', target: { zeta: 0.5, wn: 1 } }, 'invalid', 'plant.k', /gain/);
		expectDesignError({ plant: so, controller: 'PID', target: { zeta: 0.5, wn: 3 }, extraPoleFactor: 0.5 }, 'invalid', 'extraPoleFactor', /greater than 1/);
	});

	it('turns an overshoot and settling time into ζ and ωn', () => {
		// 9.47802 % ↔ ζ = 0.6 and Ts = 4/3 s ↔ ωn = 5 (reference sheet 5.2, Ogata W8).
		const res = designController({ plant: so, controller: 'PID', target: { overshootPercent: 9.47802, settlingTime: 4 / 3 } });
		expect(res.target.zeta).toBeCloseTo(0.6, 6);
		expect(res.target.wn).toBeCloseTo(5, 5);
		expect(res.target.settlingTime).toBeCloseTo(4 / 3, 12);
		expect(res.target.overshootPercent).toBeCloseTo(9.47802, 9);
	});
});
