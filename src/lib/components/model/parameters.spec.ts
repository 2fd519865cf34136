import { describe, expect, it } from 'vitest';
import { parameterRows } from './parameters';

const base = { gain: null, delaySeconds: 0, mv: { unit: '%' }, pv: { unit: '°C' } };
const pick = (rows: ReturnType<typeof parameterRows>) => rows.map((r) => [r.key, r.value, r.unit, r.alt ?? null]);

describe('parameterRows', () => {
	// Unit conversions: 1 min = 60 s (SI); rad/min = rad/s × 60; an integrating gain per minute is
	// the gain per second × 60. Values are invented; only the conversions are checked.
	it('lists K, τ, θ of an FOPDT in minutes with seconds alongside', () => {
		const rows = parameterRows({ ...base, structure: 'fopdt', parameters: { k: 1.84, tau: 312, theta: 45 }, timeUnit: 'min' });
		expect(pick(rows)).toEqual([
			['k', '1.84', '°C/%', null],
			['tau', '5.2', 'min', '312 s'],
			['theta', '0.75', 'min', '45 s']
		]);
	});

	it('lists τ1, τ2 of an overdamped SOPDT and ωn, ζ of an underdamped one', () => {
		expect(pick(parameterRows({ ...base, structure: 'sopdt', parameters: { k: 1.6, tau: 240, tau2: 35, theta: 20 }, timeUnit: 's' }))).toEqual([
			['k', '1.6', '°C/%', null],
			['tau', '240', 's', null],
			['tau2', '35', 's', null],
			['theta', '20', 's', null]
		]);
		expect(pick(parameterRows({ ...base, structure: 'sopdt', parameters: { k: 0.9, wn: 0.02, zeta: 0.55, theta: 8 }, timeUnit: 'min' }))).toEqual([
			['k', '0.9', '°C/%', null],
			['wn', '1.2', 'rad/min', '0.02 rad/s'],
			['zeta', '0.55', '', null],
			['theta', '0.1333', 'min', '8 s']
		]);
	});

	it('scales an integrating gain to the display unit', () => {
		const rows = parameterRows({ ...base, structure: 'ipdt', parameters: { k: 0.0021, theta: 25 }, timeUnit: 'min', mv: { unit: 'm³/h' }, pv: { unit: '%' } });
		expect(pick(rows)).toEqual([
			['k', '0.126', '%/(m³/h·min)', '0.0021 per s'],
			['theta', '0.4167', 'min', '25 s']
		]);
	});

	it('leaves out a zero dead time of a standard second-order model', () => {
		const rows = parameterRows({ ...base, structure: 'second_order', parameters: { k: -0.12, zeta: 0.7, wn: 0.011 }, timeUnit: 's' });
		expect(rows.map((r) => r.key)).toEqual(['k', 'wn', 'zeta']);
	});

	it('gives a rational model its steady-state gain (when known) and dead time', () => {
		const rows = parameterRows({ ...base, structure: 'rational', gain: 0.8, parameters: { theta: 6 }, delaySeconds: 6, timeUnit: 's' });
		expect(pick(rows)).toEqual([
			['k', '0.8', '°C/%', null],
			['theta', '6', 's', null]
		]);
		expect(parameterRows({ ...base, structure: 'rational', parameters: {}, timeUnit: 's' }).map((r) => r.key)).toEqual(['theta']);
	});

	it('treats a rational model with a pole at s = 0 as integrating', () => {
		const rows = parameterRows({ ...base, structure: 'rational', gain: 0.0035, den: [4, 1, 0], parameters: { theta: 2 }, delaySeconds: 2, timeUnit: 'min', pv: { unit: '%' } });
		expect(pick(rows)).toEqual([
			['k', '0.21', '%/(%·min)', '0.0035 per s'],
			['theta', '0.03333', 'min', '2 s']
		]);
	});

	it('never shows a unit beside a missing value', () => {
		const rows = parameterRows({ ...base, structure: 'fopdt', parameters: { tau: 10, theta: 1 }, timeUnit: 's' });
		expect(rows[0]).toMatchObject({ key: 'k', value: '—', unit: '' });
	});
});
