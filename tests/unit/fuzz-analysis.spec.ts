/**
 * Fuzz test of the analysis contract: 10 000 random requests from a seeded PRNG (mulberry32),
 * valid and invalid, through the same path as the API (zod schema, then analyze()). Every request
 * must either fail validation with a message and field, or raise an AnalysisInputError with a
 * field, or return a response with no NaN/Infinity anywhere and no internal non-finite repair.
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../src/lib/control/analyze';
import { AnalysisInputError } from '../../src/lib/control/errors';
import { parseAnalysisRequest } from '../../src/lib/schemas/analysis';

/** mulberry32 PRNG (public-domain 32-bit generator by Tommy Ettinger), uniform in [0, 1). */
function mulberry32(seed: number) {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

function nonFinitePaths(v: unknown, path = '', out: string[] = []): string[] {
	if (typeof v === 'number') {
		if (!Number.isFinite(v)) out.push(path);
	} else if (Array.isArray(v)) v.forEach((x, i) => nonFinitePaths(x, `${path}[${i}]`, out));
	else if (v instanceof Float64Array) v.forEach((x, i) => Number.isFinite(x) || out.push(`${path}[${i}]`));
	else if (v && typeof v === 'object') for (const [k, x] of Object.entries(v)) nonFinitePaths(x, `${path}.${k}`, out);
	return out;
}

function makeRequest(rand: () => number): unknown {
	const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)];
	const logU = (lo: number, hi: number) => Math.exp(Math.log(lo) + rand() * (Math.log(hi) - Math.log(lo)));
	const signed = (lo: number, hi: number) => (rand() < 0.5 ? -1 : 1) * logU(lo, hi);
	const mul = (a: number[], b: number[]) => {
		const o = new Array(a.length + b.length - 1).fill(0);
		a.forEach((x, i) => b.forEach((y, j) => (o[i + j] += x * y)));
		return o;
	};
	// Plant.
	let num: unknown[];
	let den: unknown[];
	const kind = rand();
	const order = rand() < 0.85 ? 1 + Math.floor(rand() * 6) : 1 + Math.floor(rand() * 20);
	if (kind < 0.5) {
		// From roots: stable, unstable, integrating, oscillatory.
		den = [1];
		for (let i = 0; i < order; ) {
			const r = rand();
			if (r < 0.1) {
				den = mul(den as number[], [1, 0]);
				i++;
			} else if (r < 0.35 && i + 2 <= order) {
				const wn = logU(0.01, 100);
				const z = rand() < 0.1 ? 0 : rand() * 1.2 - (rand() < 0.1 ? 0.5 : 0);
				den = mul(den as number[], [1, 2 * z * wn, wn * wn]);
				i += 2;
			} else {
				den = mul(den as number[], [1, (rand() < 0.1 ? -1 : 1) * logU(0.01, 100)]);
				i++;
			}
		}
		const zeros = Math.floor(rand() * Math.min(order + 1, 3));
		num = [signed(0.01, 100)];
		for (let i = 0; i < zeros; i++) num = mul(num as number[], [1, signed(0.01, 100)]);
	} else if (kind < 0.8) {
		// Raw coefficients, sometimes with leading zeros.
		den = Array.from({ length: order + 1 }, () => (rand() < 0.1 ? 0 : signed(1e-3, 1e3)));
		const nn = 1 + Math.floor(rand() * (order + 1));
		num = Array.from({ length: nn }, () => (rand() < 0.1 ? 0 : signed(1e-3, 1e3)));
		if (rand() < 0.1) den.unshift(0, 0);
	} else {
		const k = signed(0.01, 100);
		const tau = logU(0.01, 1000);
		num = [k];
		den = pick([[tau, 1], [tau * tau * 0.3, tau * 1.3, 1], [1, 0], [tau, 1, 0]]);
	}
	const plant: Record<string, unknown> = { num, den };
	if (rand() < 0.6) plant.delay = rand() < 0.05 ? logU(1e-12, 1e-6) : logU(1e-3, 100);
	// Controller.
	const type = pick(['P', 'PI', 'PD', 'PID'] as const);
	const form = pick(['ideal', 'series', 'parallel', undefined] as const);
	const controller: Record<string, unknown> = { type, kp: signed(1e-3, 1e3) };
	if (form) controller.form = form;
	if (form === 'parallel') {
		controller.ki = Math.sign(controller.kp as number) * logU(1e-3, 100);
		controller.kd = Math.sign(controller.kp as number) * logU(1e-3, 100);
	} else {
		controller.ti = logU(1e-3, 1000);
		controller.td = rand() < 0.1 ? 0 : logU(1e-3, 100);
	}
	if (rand() < 0.6) controller.n = logU(1, 100);
	if (rand() < 0.2) controller.b = rand();
	if (rand() < 0.2) controller.c = rand();
	// Options, kept light so 10 000 runs stay fast.
	const options: Record<string, unknown> = { points: 10 + Math.floor(rand() * 600) };
	if (rand() < 0.3) options.tEnd = logU(1e-2, 1e4);
	if (rand() < 0.2) options.settlingBand = pick([0.01, 0.02, 0.05, 0.1]);
	if (rand() < 0.2) options.padeOrder = 1 + Math.floor(rand() * 10);
	if (rand() < 0.2) options.bodePoints = 16 + Math.floor(rand() * 400);
	const request: Record<string, unknown> = { plant, controller, options };
	// Occasional invalid values in any field.
	if (rand() < 0.08) {
		const bad = pick([Number.NaN, Infinity, -Infinity, 'x', null, -1, 0, [], {}] as const);
		const target = pick(['plant.num', 'plant.den', 'plant.delay', 'controller.kp', 'controller.ti', 'controller.n', 'options.points', 'options.tEnd'] as const);
		const [a, b] = target.split('.');
		(request[a] as Record<string, unknown>)[b] = bad;
	}
	return request;
}

describe('fuzz: random analysis requests', () => {
	it('10 000 requests: only validation errors, never an exception, never NaN/Infinity', () => {
		const rand = mulberry32(20240611);
		let valid = 0;
		let rejected = 0;
		let engineRejected = 0;
		let unstable = 0;
		for (let i = 0; i < 10000; i++) {
			const body = makeRequest(rand);
			const parsed = parseAnalysisRequest(body);
			if (!parsed.ok) {
				rejected++;
				expect(typeof parsed.error).toBe('string');
				expect(parsed.field === null || typeof parsed.field === 'string').toBe(true);
				continue;
			}
			let res;
			try {
				res = analyze(parsed.data);
			} catch (e) {
				if (e instanceof AnalysisInputError) {
					engineRejected++;
					expect(e.field.length).toBeGreaterThan(0);
					continue;
				}
				throw new Error(`request ${i} threw ${(e as Error).message}: ${JSON.stringify(body)}`);
			}
			valid++;
			if (!res.closedLoop.stable) unstable++;
			const bad = nonFinitePaths(res);
			if (bad.length) throw new Error(`request ${i}: non-finite at ${bad.slice(0, 3).join(', ')}: ${JSON.stringify(body)}`);
			if (res.warnings.some((w) => w.startsWith('Internal'))) throw new Error(`request ${i}: ${res.warnings.find((w) => w.startsWith('Internal'))}: ${JSON.stringify(body)}`);
			expect(res.step.t.length).toBe(res.step.y.length);
			expect(res.step.u.length).toBe(res.step.y.length);
		}
		// The generator must exercise all three outcomes.
		expect(valid).toBeGreaterThan(5000);
		expect(rejected).toBeGreaterThan(300);
		expect(unstable).toBeGreaterThan(100);
		expect(valid + rejected + engineRejected).toBe(10000);
	}, 300_000);
});
