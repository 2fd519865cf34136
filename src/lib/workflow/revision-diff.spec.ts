/**
 * The comparison of two revisions: parameters side by side with the change in % ((new − old)/|old|,
 * common practice), other fields old → new, and word diffs of the texts from the `diff` package.
 */
import { describe, expect, it } from 'vitest';
import { compareRevisions, type ComparableRevision } from './revision-diff';

function revision(over: Partial<ComparableRevision> = {}): ComparableRevision {
	return {
		id: 1,
		no: 1,
		state: 'superseded',
		structure: 'fopdt',
		parameters: { k: 0.81, tau: 180, theta: 25 },
		num: [0.81],
		den: [180, 1],
		delaySeconds: 25,
		gain: 0.81,
		timeConstantSeconds: 180,
		timeUnit: 's',
		mv: { name: 'Steam injection valve', unit: '%', min: 0, max: 100 },
		pv: { name: 'Relative humidity', unit: '%RH', min: 40, max: 95 },
		operatingPoint: { mv: 30, pv: 78, note: 'Before the nozzles were replaced.' },
		provenance: { method: 'two_point', testDate: '2025-09-01', fitR2: null, fitRmse: null, validRange: 'Valve 20–45 %', revalidateBy: '2026-09-01' },
		changeSummary: 'First identification.',
		reviewComment: 'Checked.',
		...over
	};
}

describe('compareRevisions', () => {
	const a = revision();
	const b = revision({
		id: 2,
		no: 2,
		state: 'approved',
		parameters: { k: 0.65, tau: 210, theta: 30 },
		num: [0.65],
		den: [210, 1],
		delaySeconds: 30,
		gain: 0.65,
		timeConstantSeconds: 210,
		operatingPoint: { mv: 34, pv: 80, note: 'New nozzles; proofer at 36 °C.' },
		provenance: { method: 'least_squares', testDate: '2026-09-01', fitR2: 0.948, fitRmse: 0.9, validRange: 'Valve 20–50 %', revalidateBy: '2027-09-01' },
		changeSummary: 'Re-identified after the steam injection nozzles were replaced.'
	});
	const c = compareRevisions(a, b);

	it('parameters side by side with the change in %', () => {
		const byKey = Object.fromEntries(c.parameters.map((p) => [p.key, p]));
		expect(Object.keys(byKey)).toEqual(['k', 'tau', 'theta']);
		// (0.65 − 0.81)/0.81 = −19.753… %; (210 − 180)/180 = +16.67 %; (30 − 25)/25 = +20 %
		expect(byKey.k).toMatchObject({ from: 0.81, to: 0.65, unit: 'gain', note: null });
		expect(byKey.k.changePercent).toBeCloseTo(-19.75308642, 6);
		expect(byKey.tau.changePercent).toBeCloseTo(16.6666667, 6);
		expect(byKey.theta.changePercent).toBeCloseTo(20, 10);
	});

	it('nothing here is a large change (every change is at most 20 %)', () => {
		expect(c.largeChanges).toEqual([]);
	});

	it('fields old → new, flagged when changed', () => {
		const method = c.fields.find((f) => f.key === 'method');
		expect(method).toEqual({ key: 'method', label: 'Identification method', from: 'two_point', to: 'least_squares', changed: true });
		expect(c.fields.find((f) => f.key === 'mvName')?.changed).toBe(false);
		expect(c.fields.find((f) => f.key === 'den')).toMatchObject({ from: '[180, 1]', to: '[210, 1]', changed: true });
	});

	it('texts as a word diff: removed and added words, unchanged text kept', () => {
		const summary = c.texts.find((t) => t.key === 'changeSummary');
		expect(summary?.changed).toBe(true);
		const removed = summary?.parts.filter((p) => p.removed).map((p) => p.value.trim()).join(' ');
		const added = summary?.parts.filter((p) => p.added).map((p) => p.value.trim()).join(' ');
		expect(removed).toMatch(/First identification/);
		expect(added).toMatch(/Re-identified after the steam injection nozzles were replaced/);
		const range = c.texts.find((t) => t.key === 'validRange');
		expect(range?.parts.filter((p) => !p.added && !p.removed).map((p) => p.value).join('')).toMatch(/Valve 20–/);
		expect(c.texts.find((t) => t.key === 'reviewComment')?.changed).toBe(false);
	});

	it('both transfer functions, for overlaying the step responses', () => {
		expect(c.plants).toEqual({ from: { num: [0.81], den: [180, 1], delay: 25 }, to: { num: [0.65], den: [210, 1], delay: 30 } });
	});

	it('a parameter only on one side is marked added/removed, a change from zero has no percentage', () => {
		const s = revision({ structure: 'sopdt', parameters: { k: 0.81, tau: 180, tau2: 40, theta: 0 }, delaySeconds: 0 });
		const r = compareRevisions(revision({ delaySeconds: 0, parameters: { k: 0.81, tau: 180, theta: 0 } }), s);
		expect(r.parameters.find((p) => p.key === 'tau2')).toMatchObject({ from: null, to: 40, note: 'added', changePercent: null });
		const z = compareRevisions(revision({ delaySeconds: 0 }), revision({ delaySeconds: 5 }));
		expect(z.parameters.find((p) => p.key === 'theta')).toMatchObject({ from: 0, to: 5, note: 'from zero', changePercent: null });
		expect(r.largeChanges[0].parameter).toBe('structure');
	});
});
