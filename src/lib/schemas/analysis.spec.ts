import { describe, expect, it } from 'vitest';
import { parseAnalysisRequest } from './analysis';

const ok = { plant: { num: [1.2], den: [4, 1], delay: 0.8 }, controller: { type: 'PI', kp: 2, ti: 4 } };
const fieldOf = (body: unknown) => {
	const r = parseAnalysisRequest(body);
	return r.ok ? 'ok' : r.field;
};
const withPlant = (plant: unknown) => ({ ...ok, plant });
const withController = (controller: unknown) => ({ ...ok, controller });

describe('analysis request schema', () => {
	it('accepts the contract request and trims leading zeros (documented: trim, not reject)', () => {
		const r = parseAnalysisRequest({ ...ok, plant: { num: [0, 1.2], den: [0, 0, 4, 1], delay: 0.8 } });
		expect(r.ok).toBe(true);
		if (r.ok) {
			expect(r.data.plant).toEqual({ num: [1.2], den: [4, 1], delay: 0.8 });
		}
		expect(fieldOf({ ...ok, options: { tEnd: 30, points: 500, settlingBand: 0.05, padeOrder: 3, bodePoints: 200 } })).toBe('ok');
		expect(fieldOf({ ...ok, plant: { num: [1], den: [1, 1] } })).toBe('ok');
	});

	it('rejects NaN, Infinity and strings naming the field (JSON cannot carry NaN; a JS caller can)', () => {
		expect(fieldOf(withPlant({ num: [Number.NaN], den: [1, 1] }))).toBe('plant.num.0');
		expect(fieldOf(withPlant({ num: [1], den: [1, Infinity] }))).toBe('plant.den.1');
		expect(fieldOf(withPlant({ num: ['1'], den: [1, 1] }))).toBe('plant.num.0');
		expect(fieldOf(withPlant({ num: [1], den: 's+1' }))).toBe('plant.den');
		expect(fieldOf(withController({ type: 'PI', kp: '2', ti: 4 }))).toBe('controller.kp');
		expect(fieldOf(withController({ type: 'PI', kp: 2, ti: Number.POSITIVE_INFINITY }))).toBe('controller.ti');
	});

	it('rejects empty, all-zero and over-order denominators, improper plants, negative delay', () => {
		expect(fieldOf(withPlant({ num: [1], den: [] }))).toBe('plant.den');
		expect(fieldOf(withPlant({ num: [1], den: [0, 0, 0] }))).toBe('plant.den');
		expect(fieldOf(withPlant({ num: [0], den: [1, 1] }))).toBe('plant.num');
		expect(fieldOf(withPlant({ num: [1, 2, 3], den: [1, 1] }))).toBe('plant.num');
		expect(fieldOf(withPlant({ num: [1], den: Array(22).fill(1) }))).toBe('plant.den');
		expect(fieldOf(withPlant({ num: [1], den: Array(21).fill(1) }))).toBe('ok');
		expect(fieldOf(withPlant({ num: [1], den: [1, 1], delay: -0.1 }))).toBe('plant.delay');
		expect(fieldOf(withPlant({ num: [1e-40], den: [1, 1] }))).toBe('plant.num');
	});

	it('rejects bad controller settings: ti ≤ 0, n ≤ 0, missing kp, unknown type/form, missing ti/td/ki/kd', () => {
		expect(fieldOf(withController({ type: 'PI', kp: 2, ti: 0 }))).toBe('controller.ti');
		expect(fieldOf(withController({ type: 'PI', kp: 2, ti: -1 }))).toBe('controller.ti');
		expect(fieldOf(withController({ type: 'PID', kp: 2, ti: 1, td: 0.2, n: 0 }))).toBe('controller.n');
		expect(fieldOf(withController({ type: 'PID', kp: 2, ti: 1, td: 0.2, n: -5 }))).toBe('controller.n');
		expect(fieldOf(withController({ type: 'PI', ti: 1 }))).toBe('controller.kp');
		expect(fieldOf(withController({ type: 'PI', kp: 0, ti: 1 }))).toBe('controller.kp');
		expect(fieldOf(withController({ type: 'PII', kp: 1, ti: 1 }))).toBe('controller.type');
		expect(fieldOf(withController({ type: 'PI', form: 'interacting', kp: 1, ti: 1 }))).toBe('controller.form');
		expect(fieldOf(withController({ type: 'PI', kp: 1 }))).toBe('controller.ti');
		expect(fieldOf(withController({ type: 'PD', kp: 1 }))).toBe('controller.td');
		expect(fieldOf(withController({ type: 'PI', form: 'parallel', kp: 1, ti: 2 }))).toBe('controller.ki');
		expect(fieldOf(withController({ type: 'PID', form: 'parallel', kp: 1, ki: 0.5 }))).toBe('controller.kd');
		expect(fieldOf(withController({ type: 'PID', form: 'parallel', kp: 1, ki: -0.5, kd: 1 }))).toBe('controller.ki');
		expect(fieldOf(withController({ type: 'PD', kp: 1, td: 1e-9 }))).toBe('controller.td');
		expect(fieldOf(withController({ type: 'PID', kp: 1, ti: 1, td: 0.1, n: null }))).toBe('ok');
	});

	it('rejects an ideal derivative on a plant with direct feedthrough at controller.n', () => {
		expect(fieldOf({ plant: { num: [1, 1], den: [2, 1] }, controller: { type: 'PD', kp: 1, td: 0.5 } })).toBe('controller.n');
		expect(fieldOf({ plant: { num: [1, 1], den: [2, 1] }, controller: { type: 'PD', kp: 1, td: 0.5, n: 10 } })).toBe('ok');
	});

	it('validates options, uncertainty and sweep', () => {
		expect(fieldOf({ ...ok, options: { tEnd: 0 } })).toBe('options.tEnd');
		expect(fieldOf({ ...ok, options: { points: 2.5 } })).toBe('options.points');
		expect(fieldOf({ ...ok, options: { points: 5 } })).toBe('options.points');
		expect(fieldOf({ ...ok, options: { settlingBand: 0 } })).toBe('options.settlingBand');
		expect(fieldOf({ ...ok, options: { padeOrder: 11 } })).toBe('options.padeOrder');
		expect(fieldOf({ ...ok, uncertainty: { gainPercent: 120 } })).toBe('uncertainty.gainPercent');
		expect(fieldOf({ ...ok, sweep: { parameter: 'kd', from: 0.1, to: 1 } })).toBe('sweep.parameter');
		expect(fieldOf({ ...ok, sweep: { parameter: 'kp', from: 0, to: 1 } })).toBe('sweep.from');
		expect(fieldOf({ ...ok, sweep: { parameter: 'kp', from: 0.1, to: 10, count: 21, scale: 'log' } })).toBe('ok');
	});

	it('rejects a body that is not an object', () => {
		expect(fieldOf(null)).toBeNull();
		expect(fieldOf([1, 2])).toBeNull();
		expect(fieldOf({ controller: ok.controller })).toBe('plant');
	});
});
