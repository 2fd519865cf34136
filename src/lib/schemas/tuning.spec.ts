import { describe, expect, it } from 'vitest';
import { parseTuningRequest } from './tuning';

const good = { plant: { structure: 'fopdt', k: 1.2, tau: 4, theta: 0.8 }, rule: 'simc', controller: 'PI' };

describe('tuning request schema', () => {
	it('accepts a valid request and strips unknown keys', () => {
		const out = parseTuningRequest({ ...good, extra: 1, parameter: 2 });
		expect(out).toEqual({ ok: true, data: { ...good, parameter: 2 } });
		const ipdt = parseTuningRequest({ plant: { structure: 'ipdt', k: 0.5, theta: 2 }, rule: 'amigo', controller: 'PID' });
		expect(ipdt.ok).toBe(true);
		const zeroDelay = parseTuningRequest({ ...good, plant: { ...good.plant, theta: 0 } });
		expect(zeroDelay.ok).toBe(true);
	});

	it.each([
		['NaN gain', { ...good, plant: { ...good.plant, k: Number.NaN } }, 'plant.k', /finite number/],
		['infinite τ', { ...good, plant: { ...good.plant, tau: Number.POSITIVE_INFINITY } }, 'plant.tau', /finite number/],
		['string θ', { ...good, plant: { ...good.plant, theta: '0.8' } }, 'plant.theta', /finite number/],
		['zero τ', { ...good, plant: { ...good.plant, tau: 0 } }, 'plant.tau', /greater than zero/],
		['negative τ', { ...good, plant: { ...good.plant, tau: -4 } }, 'plant.tau', /greater than zero/],
		['negative θ', { ...good, plant: { ...good.plant, theta: -0.1 } }, 'plant.theta', /zero or positive/],
		['zero gain', { ...good, plant: { ...good.plant, k: 0 } }, 'plant.k', /not be zero/],
		['missing τ2', { ...good, plant: { structure: 'sopdt', k: 1, tau: 4, theta: 1 } }, 'plant.tau2', /finite number/],
		['zero τ2', { ...good, plant: { structure: 'sopdt', k: 1, tau: 4, tau2: 0, theta: 1 } }, 'plant.tau2', /greater than zero/],
		['unknown structure', { ...good, plant: { structure: 'pid', k: 1, theta: 1 } }, 'plant.structure', /fopdt, sopdt or ipdt/],
		['missing plant', { rule: 'simc', controller: 'PI' }, 'plant', /must be an object/],
		['unknown rule', { ...good, rule: 'guess' }, 'rule', /rule must be one of/],
		['bad controller', { ...good, controller: 'PIDD' }, 'controller', /P, PI, PD or PID/],
		['zero parameter', { ...good, parameter: 0 }, 'parameter', /greater than zero/],
		['NaN parameter', { ...good, parameter: Number.NaN }, 'parameter', /finite number/],
		['string parameter', { ...good, parameter: '3' }, 'parameter', /finite number/]
	])('rejects %s, naming the field', (_label, body, field, message) => {
		const out = parseTuningRequest(body);
		expect(out.ok).toBe(false);
		if (out.ok) return;
		expect(out.field).toBe(field);
		expect(out.error).toMatch(message);
	});

	it('rejects a body that is not an object', () => {
		for (const body of [null, 'text', 42, []]) {
			const out = parseTuningRequest(body);
			expect(out.ok).toBe(false);
			if (!out.ok) expect(out.field).toBeNull();
		}
	});
});
