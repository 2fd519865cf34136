/**
 * From the entered revision (minutes) to the stored model (seconds), checked against
 * tests/fixtures/workflow/workflow-reference.json, written by
 * tests/fixtures/workflow/generate_workflow_fixtures.py with Debian's SciPy: the frequency
 * response of the minute model from scipy.signal.freqs at p = jω·60 must equal our stored
 * seconds model at s = jω; the listing time constant is −1/Re(p) of the slowest pole from
 * numpy.roots; the listing gain is lim s→0 of s^r·G(s).
 */
import { describe, expect, it } from 'vitest';
import reference from '../../../tests/fixtures/workflow/workflow-reference.json';
import { listingColumns, parametersForForm, storedParameters, toStoredModel, transferFunctionOf } from './model-values';
import type { RevisionInput } from '../schemas/revision';

/** Horner evaluation of a real polynomial (descending powers) at s = jω: returns [re, im]. */
function polyAtJw(c: readonly number[], w: number): [number, number] {
	let re = 0;
	let im = 0;
	for (const a of c) {
		// (re + j im)(j w) + a = (−im·w + a) + j(re·w)
		const r = -im * w + a;
		im = re * w;
		re = r;
	}
	return [re, im];
}

function responseAt(num: number[], den: number[], delay: number, w: number): [number, number] {
	const [nr, ni] = polyAtJw(num, w);
	const [dr, di] = polyAtJw(den, w);
	const d2 = dr * dr + di * di;
	const hr = (nr * dr + ni * di) / d2;
	const hi = (ni * dr - nr * di) / d2;
	const cr = Math.cos(-w * delay);
	const ci = Math.sin(-w * delay);
	return [hr * cr - hi * ci, hr * ci + hi * cr];
}

function inputOf(partial: Record<string, unknown>): RevisionInput {
	return {
		structure: partial.structure as RevisionInput['structure'],
		sopdtForm: partial.structure === 'sopdt' ? ((partial.sopdtForm as RevisionInput['sopdtForm']) ?? 'time_constants') : null,
		k: (partial.k as number) ?? null,
		tau: (partial.tau as number) ?? null,
		tau2: (partial.tau2 as number) ?? null,
		zeta: (partial.zeta as number) ?? null,
		wn: (partial.wn as number) ?? null,
		theta: partial.structure === 'second_order' ? null : ((partial.theta as number) ?? 0),
		num: (partial.num as number[]) ?? null,
		den: (partial.den as number[]) ?? null,
		timeUnit: 'min',
		mvName: 'Valve',
		mvUnit: '%',
		mvMin: 0,
		mvMax: 100,
		pvName: 'Temperature',
		pvUnit: '°C',
		pvMin: 0,
		pvMax: 200,
		opMv: null,
		opPv: null,
		opNote: null,
		method: 'step_test',
		testDate: null,
		fitR2: null,
		fitRmse: null,
		validRange: null,
		revalidateBy: null,
		changeSummary: 'First identification.',
		dataAttachmentId: null
	};
}

describe('stored model from a revision entered in minutes (SciPy freqs reference)', () => {
	for (const c of reference.models) {
		it(`${c.name}: frequency response, delay, listing gain and time constant`, () => {
			const stored = toStoredModel(inputOf(c.input));
			expect(stored.delaySeconds).toBeCloseTo(c.delaySeconds, 9);
			c.w.forEach((w, i) => {
				const [re, im] = responseAt(stored.num, stored.den, stored.delaySeconds, w);
				const scale = Math.hypot(c.re[i], c.im[i]);
				expect(Math.abs(re - c.re[i])).toBeLessThan(1e-9 * Math.max(1, scale));
				expect(Math.abs(im - c.im[i])).toBeLessThan(1e-9 * Math.max(1, scale));
			});
			expect(stored.gain).not.toBeNull();
			expect((stored.gain as number) / c.gain).toBeCloseTo(1, 9);
			if (c.timeConstantSeconds === null) expect(stored.timeConstantSeconds).toBeNull();
			else expect((stored.timeConstantSeconds as number) / c.timeConstantSeconds).toBeCloseTo(1, 9);
		});
	}
});

describe('the edit form gets back what was entered', () => {
	for (const c of reference.models) {
		it(`${c.name}: seconds → minutes round trip`, () => {
			const input = inputOf(c.input);
			const stored = storedParameters(input);
			const back = parametersForForm(input.structure, stored, 'min');
			for (const key of ['k', 'tau', 'tau2', 'zeta', 'wn', 'theta'] as const) {
				if (input[key] === null) expect(back[key]).toBeNull();
				else expect(back[key]).toBeCloseTo(input[key] as number, 12);
			}
			if (input.num) back.num?.forEach((x, i) => expect(x).toBeCloseTo((input.num as number[])[i], 12));
			if (input.den) back.den?.forEach((x, i) => expect(x).toBeCloseTo((input.den as number[])[i], 12));
			expect(back.sopdtForm).toBe(input.sopdtForm);
		});
	}
});

describe('structure formulas in seconds (textbook forms, common practice)', () => {
	it('FOPDT K/(τs+1): num [K], den [τ, 1]', () => {
		expect(transferFunctionOf('fopdt', { k: 0.42, tau: 480, theta: 45 })).toEqual({ num: [0.42], den: [480, 1], delay: 45 });
	});
	it('IPDT Kv/s: num [Kv], den [1, 0]', () => {
		expect(transferFunctionOf('ipdt', { k: 0.0042, theta: 12 })).toEqual({ num: [0.0042], den: [1, 0], delay: 12 });
	});
	it('standard second order has no dead time even when one is stored', () => {
		expect(transferFunctionOf('second_order', { k: 2, zeta: 0.5, wn: 2, theta: 5 }).delay).toBe(0);
	});
	it('listing columns: IPDT and rational have no single time constant; ζ = 0 has none either', () => {
		expect(listingColumns('ipdt', { k: 0.1, theta: 1 }).timeConstantSeconds).toBeNull();
		expect(listingColumns('second_order', { k: 1, zeta: 0, wn: 1 }).timeConstantSeconds).toBeNull();
		expect(listingColumns('rational', { num: [1], den: [0, 0], theta: 0 }).gain).toBeNull();
	});
});
