import { describe, expect, it } from 'vitest';
import { parseDesignRequest } from './design';

const good = {
	plant: { structure: 'sopdt', k: 1, tau: 4, tau2: 1 },
	controller: 'PID',
	target: { overshootPercent: 5, settlingTime: 3 }
};

describe('design request schema', () => {
	it('accepts valid requests', () => {
		expect(parseDesignRequest(good)).toEqual({ ok: true, data: good });
		const std = parseDesignRequest({
			plant: { structure: 'second_order', k: 2, wn: 1.5, zeta: 0, theta: 0.2 },
			controller: 'PD',
			target: { zeta: 0.7, wn: 3 },
			extraPoleFactor: 8
		});
		expect(std.ok).toBe(true);
	});

	it.each([
		['NaN ζ', { ...good, target: { zeta: Number.NaN, wn: 1 } }, 'target.zeta', /finite number/],
		['zero ζ', { ...good, target: { zeta: 0, wn: 1 } }, 'target.zeta', /greater than zero/],
		['100 % overshoot', { ...good, target: { overshootPercent: 100, wn: 1 } }, 'target.overshootPercent', /below 100/],
		['negative overshoot', { ...good, target: { overshootPercent: -1, wn: 1 } }, 'target.overshootPercent', /0 or more/],
		['infinite settling time', { ...good, target: { zeta: 0.5, settlingTime: Number.POSITIVE_INFINITY } }, 'target.settlingTime', /finite number/],
		['zero settling time', { ...good, target: { zeta: 0.5, settlingTime: 0 } }, 'target.settlingTime', /greater than zero/],
		['string ωn', { ...good, target: { zeta: 0.5, wn: '2' } }, 'target.wn', /finite number/],
		['ζ and overshoot', { ...good, target: { zeta: 0.5, overshootPercent: 5, wn: 1 } }, 'target.overshootPercent', /not both/],
		['settling time and ωn', { ...good, target: { zeta: 0.5, settlingTime: 2, wn: 1 } }, 'target.wn', /not both/],
		['zero τ', { ...good, plant: { structure: 'fopdt', k: 1, tau: 0 } }, 'plant.tau', /greater than zero/],
		['negative τ2', { ...good, plant: { structure: 'sopdt', k: 1, tau: 4, tau2: -1 } }, 'plant.tau2', /greater than zero/],
		['negative θ', { ...good, plant: { ...good.plant, theta: -1 } }, 'plant.theta', /zero or positive/],
		['zero plant ωn', { ...good, plant: { structure: 'second_order', k: 1, wn: 0, zeta: 0.3 } }, 'plant.wn', /greater than zero/],
		['negative plant ζ', { ...good, plant: { structure: 'second_order', k: 1, wn: 1, zeta: -0.3 } }, 'plant.zeta', /zero or positive/],
		['zero gain', { ...good, plant: { ...good.plant, k: 0 } }, 'plant.k', /not be zero/],
		['ipdt structure', { ...good, plant: { structure: 'ipdt', k: 1, theta: 1 } }, 'plant.structure', /second_order/],
		['bad controller', { ...good, controller: 'I' }, 'controller', /P, PI, PD or PID/],
		['missing target', { plant: good.plant, controller: 'PI' }, 'target', /target must be an object/],
		['extra-pole factor 1', { ...good, extraPoleFactor: 1 }, 'extraPoleFactor', /greater than 1/]
	])('rejects %s, naming the field', (_label, body, field, message) => {
		const out = parseDesignRequest(body);
		expect(out.ok).toBe(false);
		if (out.ok) return;
		expect(out.field).toBe(field);
		expect(out.error).toMatch(message);
	});

	it('rejects a body that is not an object', () => {
		const out = parseDesignRequest(null);
		expect(out.ok).toBe(false);
		if (!out.ok) expect(out.field).toBeNull();
	});
});
