/**
 * The bench state: form conversions when the form changes, proportional band ↔ gain, s ↔ min
 * display and reset rate, rule loading into the current form, saved sets, the save form's
 * fields and the requests sent to `analyze`. Check values: fixtures/bench-reference.json
 * (generate_bench_fixtures.py with NumPy; sources named there and beside each check):
 * - PB = 100/(Kc·PV span/output span) — common practice (Liptak, Instrument Engineers' Handbook);
 * - series ↔ ideal ↔ parallel — Åström & Hägglund, PID Controllers (ISA 1995), §3.4, from memory,
 *   on Skogestad 2003 example E2's SIMC series PID (1.2987, 2 s, 1.2 s);
 * - 0.5 min/repeat = 2 repeats/min = 30 s/repeat — common practice;
 * - rules on K = 1.2, τ = 4 s, θ = 0.8 s — SIMC (Skogestad 2003), AMIGO (Åström & Hägglund 2004).
 */
import { describe, expect, it } from 'vitest';
import ref from './fixtures/bench-reference.json';
import { analyze } from '../control';
import { BENCH_POINTS, BenchState, BODE_POINTS, MAX_COMPARE, predictedMetrics, resample, responseWindow, SWEEP_COUNT, WINDOW_FACTOR, type BenchModelInput, type SavedTuningSet } from './bench.svelte';
import { ruleRows } from './rules';

const rel = (a: number | null | undefined, b: number, tol = 1e-9) => {
	expect(a).not.toBeNull();
	expect(a).not.toBeUndefined();
	expect(Math.abs((a as number) - b)).toBeLessThanOrEqual(tol * Math.max(1, Math.abs(b)));
};

/** The reference FOPDT 1.2·e^(−0.8s)/(4s + 1), PV 0–150 °C, MV 0–100 %. */
function fopdtModel(over: Partial<BenchModelInput> = {}): BenchModelInput {
	return {
		plant: { num: [ref.rules.plant.k], den: [ref.rules.plant.tau, 1], delay: ref.rules.plant.theta },
		timeUnit: 's',
		pv: { name: 'Zone temperature', unit: '°C', min: 0, max: ref.band.pvSpan },
		mv: { name: 'Heater output', unit: '%', min: 0, max: ref.band.outputSpan },
		...over
	};
}

describe('initial settings', () => {
	it('start from SIMC PI when no tuning set is approved (Skogestad 2003, τc = θ)', () => {
		const b = new BenchState(fopdtModel());
		expect(b.type).toBe('PI');
		expect(b.form).toBe('ideal');
		rel(b.kp, ref.rules.simcPi.kp);
		rel(b.ti, ref.rules.simcPi.ti);
		expect(b.origin).toMatchObject({ kind: 'rule', rule: 'simc' });
		expect(b.edited).toBe(false);
	});

	it('start from the approved tuning set in its saved form when there is one', () => {
		const saved: SavedTuningSet = { id: 7, loopTag: 'TIC-2104', state: 'approved', controllerType: 'PID', form: 'series', kp: 1.3, tiSeconds: 2, tdSeconds: 1.2, filterN: 8, rule: 'simc', ruleParameter: 0.77 };
		const b = new BenchState(fopdtModel({ savedSets: [saved] }));
		expect(b.form).toBe('series');
		expect(b.type).toBe('PID');
		expect([b.kp, b.ti, b.td, b.n, b.filterOn]).toEqual([1.3, 2, 1.2, 8, true]);
		expect(b.ruleForSave).toEqual({ rule: 'simc', parameter: 0.77 });
	});
});

describe('proportional band ↔ gain (PB = 100/(Kc·PV span/output span), common practice)', () => {
	it('shows the band of the gain and sets the gain from a band, keeping the sign', () => {
		const b = new BenchState(fopdtModel());
		ref.band.gains.forEach((g, i) => {
			expect(b.setDisplay('kp', g)).toBeNull();
			rel(b.band, ref.band.bands[i], 1e-12);
			rel(b.display('band'), ref.band.bands[i], 1e-12);
		});
		expect(b.setGainMode('band')).toBeNull();
		expect(b.setDisplay('band', ref.band.bands[1])).toBeNull();
		rel(b.kp, ref.band.gains[1], 1e-12);
	});

	it('moves the gain when the band slider moves, and a wider band means a smaller gain', () => {
		const b = new BenchState(fopdtModel());
		b.setPosition('band', 200);
		const k1 = b.kp;
		b.setPosition('band', 800);
		expect(b.kp).toBeGreaterThan(0);
		expect(b.kp).toBeLessThan(k1);
	});

	it('refuses the band without spans and a zero band, naming the problem', () => {
		const b = new BenchState(fopdtModel({ pv: { name: 'x', unit: '°C', min: 5, max: 5 } }));
		expect(b.band).toBeNull();
		expect(b.setGainMode('band')).toMatch(/spans/);
		expect(b.gainMode).toBe('gain');
		const c = new BenchState(fopdtModel());
		expect(c.setDisplay('band', 0)).toMatch(/must not be zero/);
		expect(c.fieldErrors.band).toMatch(/must not be zero/);
	});
});

describe('form conversions applied when the form changes (Åström & Hägglund 1995, §3.4)', () => {
	function pidIdeal() {
		const b = new BenchState(fopdtModel());
		b.setType('PID');
		b.filterOn = false;
		b.setDisplay('kp', ref.forms.ideal.kp);
		b.setDisplay('ti', ref.forms.ideal.ti);
		b.setDisplay('td', ref.forms.ideal.td);
		return b;
	}

	it('ideal → series gives Skogestad 2003 E2 series PID (1.2987, 2 s, 1.2 s)', () => {
		const b = pidIdeal();
		expect(b.setForm('series')).toBe(true);
		expect(b.form).toBe('series');
		rel(b.kp, ref.forms.series.kp, 1e-9);
		rel(b.ti, ref.forms.series.ti, 1e-9);
		rel(b.td, ref.forms.series.td, 1e-9);
		expect(b.formNote).toBeNull();
	});

	it('ideal → parallel gives Ki = Kc/Ti and Kd = Kc·Td; and back to ideal', () => {
		const b = pidIdeal();
		b.setForm('parallel');
		rel(b.kp, ref.forms.parallel.kp, 1e-12);
		rel(b.ki, ref.forms.parallel.ki, 1e-12);
		rel(b.kd, ref.forms.parallel.kd, 1e-12);
		expect(b.controller.form).toBe('parallel');
		expect('ti' in b.controller || 'td' in b.controller).toBe(false);
		b.setForm('series');
		rel(b.ti, ref.forms.series.ti, 1e-9);
		b.setForm('ideal');
		rel(b.kp, ref.forms.ideal.kp, 1e-9);
		rel(b.ti, ref.forms.ideal.ti, 1e-9);
		rel(b.td, ref.forms.ideal.td, 1e-9);
	});

	it('says so next to the form instead of converting when series cannot represent the setting (Ti < 4·Td)', () => {
		const b = new BenchState(fopdtModel());
		b.setType('PID');
		b.setDisplay('kp', ref.notSeries.kp);
		b.setDisplay('ti', ref.notSeries.ti);
		b.setDisplay('td', ref.notSeries.td);
		expect(b.setForm('series')).toBe(false);
		expect(b.form).toBe('ideal');
		expect(b.formNote?.kind).toBe('error');
		expect(b.formNote?.text).toMatch(/Ti ≥ 4·Td/);
		expect([b.kp, b.ti, b.td]).toEqual([ref.notSeries.kp, ref.notSeries.ti, ref.notSeries.td]);
	});

	it('warns that the series conversion is not exact with a derivative filter', () => {
		const b = pidIdeal();
		b.filterOn = true;
		b.setForm('series');
		expect(b.formNote?.kind).toBe('info');
		expect(b.formNote?.text).toMatch(/filter/);
	});
});

describe('s ↔ min display and the reset rate (common practice: 0.5 min/repeat = 2 repeats/min = 30 s)', () => {
	it('shows times in the display unit and keeps seconds inside', () => {
		const b = new BenchState(fopdtModel({ timeUnit: 'min' }));
		b.setDisplay('ti', ref.units.tiMinutes);
		rel(b.ti, ref.units.tiSeconds, 1e-12);
		rel(b.display('ti'), ref.units.tiMinutes, 1e-12);
		rel(b.repeatsPerMinute, ref.units.repeatsPerMinute, 1e-12);
		b.setDisplay('ti', ref.units.exampleMinPerRepeat);
		rel(b.ti, ref.units.exampleSeconds, 1e-12);
		rel(b.repeatsPerMinute, ref.units.exampleRepeatsPerMinute, 1e-12);
		b.timeUnit = 's';
		rel(b.display('ti'), ref.units.exampleSeconds, 1e-12);
	});

	it('shows Ki per minute and Kd in minutes in the parallel form', () => {
		const b = new BenchState(fopdtModel({ timeUnit: 'min' }));
		b.setType('PID');
		b.setForm('parallel');
		const ki = b.ki;
		const kd = b.kd;
		rel(b.display('ki'), ki * 60, 1e-12);
		rel(b.display('kd'), kd / 60, 1e-12);
		b.setDisplay('ki', 3);
		rel(b.ki, 3 / 60, 1e-12);
		rel(b.repeatsPerMinute, (60 * b.ki) / b.kp, 1e-12);
	});
});

describe('rule loading converts to the current form', () => {
	it('loads AMIGO PID into the series form with the values of the series zeros (NumPy)', () => {
		const b = new BenchState(fopdtModel());
		b.setType('PID');
		b.setForm('series');
		const amigo = ruleRows({ structure: 'fopdt', ...ref.rules.plant }, 'PID', 'ideal', null).find((r) => r.rule === 'amigo')!;
		expect(b.loadSettings({ type: 'PID', form: 'ideal', kp: amigo.ideal!.kp, ti: amigo.ideal!.ti, td: amigo.ideal!.td, n: null }, { kind: 'rule', rule: 'amigo', name: amigo.name, parameter: null })).toBe('series');
		rel(b.kp, ref.rules.amigoPidSeries!.kp, 1e-9);
		rel(b.ti, ref.rules.amigoPidSeries!.ti, 1e-9);
		rel(b.td, ref.rules.amigoPidSeries!.td, 1e-9);
		expect(b.ruleForSave).toEqual({ rule: 'amigo', parameter: null });
		b.setPosition('kp', 10);
		expect(b.ruleForSave).toEqual({ rule: null, parameter: null });
	});

	it('loads SIMC PI into the parallel form as Kp and Ki', () => {
		const b = new BenchState(fopdtModel());
		b.setForm('parallel');
		b.setDisplay('kp', 1);
		b.loadSettings({ type: 'PI', form: 'ideal', kp: ref.rules.simcPi.kp, ti: ref.rules.simcPi.ti }, { kind: 'rule', rule: 'simc', name: 'SIMC', parameter: 0.8 });
		expect(b.form).toBe('parallel');
		rel(b.kp, ref.rules.simcPiParallel.kp, 1e-12);
		rel(b.ki, ref.rules.simcPiParallel.ki, 1e-12);
	});

	it('loads in the ideal form and says so when the series form cannot represent the settings', () => {
		const b = new BenchState(fopdtModel());
		b.setType('PID');
		b.setForm('series');
		const form = b.loadSettings({ type: 'PID', form: 'ideal', ...ref.notSeries }, { kind: 'design', summary: 'test' });
		expect(form).toBe('ideal');
		expect(b.form).toBe('ideal');
		expect(b.formNote?.text).toMatch(/Loaded in the ideal form/);
		expect([b.kp, b.ti, b.td]).toEqual([ref.notSeries.kp, ref.notSeries.ti, ref.notSeries.td]);
	});
});

describe('invalid input changes nothing and names the field', () => {
	it('refuses zero gain, non-positive Ti, negative Td, N ≤ 0, weights outside 0…1 and Ki of the wrong sign', () => {
		const b = new BenchState(fopdtModel());
		const before = { kp: b.kp, ti: b.ti };
		expect(b.setDisplay('kp', 0)).toMatch(/Kp/);
		expect(b.setDisplay('ti', 0)).toMatch(/Ti/);
		expect(b.setDisplay('ti', Number.NaN)).toMatch(/number/);
		expect(b.setDisplay('td', -1)).toMatch(/Td/);
		expect(b.setDisplay('n', 0)).toMatch(/N/);
		expect(b.setDisplay('b', 2)).toMatch(/between 0 and 1/);
		b.setForm('parallel');
		expect(b.setDisplay('ki', -0.1)).toMatch(/same sign/);
		expect(b.fieldErrors).toMatchObject({ kp: expect.any(String), ti: expect.any(String), ki: expect.any(String) });
		expect(b.kp).toBeCloseTo(before.kp, 12);
		expect(b.setDisplay('kp', 2)).toBeNull();
		expect(b.fieldErrors.kp).toBeUndefined();
	});
});

describe('requests to analyze', () => {
	it('send the plant and the controller of the current form, nothing else', () => {
		const b = new BenchState(fopdtModel());
		expect(b.analysisRequest).toEqual({
			plant: { num: [1.2], den: [4, 1], delay: 0.8 },
			controller: { type: 'PI', form: 'ideal', kp: b.kp, ti: b.ti, td: null, n: null, b: 1, c: 0 },
			options: { points: BENCH_POINTS, bodePoints: BODE_POINTS, settlingBand: 0.02 }
		});
		b.setType('PID');
		b.setForm('parallel');
		expect(b.analysisRequest.controller).toEqual({ type: 'PID', form: 'parallel', kp: b.kp, ki: b.ki, kd: b.kd, n: 10, b: 1, c: 0 });
		const r = analyze(b.analysisRequest);
		expect(r.closedLoop.stable).toBe(true);
		expect(r.step.t).toHaveLength(BENCH_POINTS);
	});

	it('sweep over the slider range, flip both signs for a reverse-acting loop and add the envelope only when on', () => {
		const b = new BenchState(fopdtModel({ plant: { num: [-1.2], den: [4, 1], delay: 0.8 } }));
		expect(b.kp).toBeLessThan(0);
		const x = b.extraRequest;
		expect(x.plant.num).toEqual([1.2]);
		expect(x.controller.kp).toBeCloseTo(-b.kp, 15);
		expect(x.sweep).toEqual({ parameter: 'kp', from: b.scales.kp.min, to: b.scales.kp.max, count: SWEEP_COUNT, scale: 'log' });
		expect(x.uncertainty).toBeUndefined();
		b.sweep = 'integral';
		b.robust.enabled = true;
		expect(b.extraRequest.sweep?.parameter).toBe('ti');
		expect(b.extraRequest.uncertainty).toEqual({ gainPercent: 20, delayPercent: 30, timeConstantPercent: 20 });
		b.sweep = 'derivative';
		expect(b.extraRequest.sweep?.parameter).toBe('kp');
		const nominal = analyze(b.analysisRequest);
		const flipped = analyze(b.extraRequest);
		expect(flipped.closedLoop.poles.length).toBe(nominal.closedLoop.poles.length);
		flipped.step.y.forEach((y, i) => expect(y).toBeCloseTo(nominal.step.y[i], 9));
	});

	it('drop the dead-time range for a plant without dead time', () => {
		const b = new BenchState(fopdtModel({ plant: { num: [1], den: [1, 3, 2], delay: 0 } }));
		b.robust.enabled = true;
		expect(b.extraRequest.uncertainty?.delayPercent).toBe(0);
		expect(b.setUncertainty('gainPercent', 120)).toMatch(/0 to 99/);
		expect(b.robust.gainPercent).toBe(20);
	});
});

describe('saved sets, the save form and the comparison', () => {
	const parallel: SavedTuningSet = { id: 3, loopTag: 'PIC-3301', state: 'draft', controllerType: 'PID', form: 'parallel', kp: 2, tiSeconds: 4, tdSeconds: 0.5, filterN: null, rule: null, ruleParameter: null };

	it('reads a parallel saved set as Ki = Kp/Ti, Kd = Kp·Td (the schema stores Ti and Td)', () => {
		const b = new BenchState(fopdtModel({ savedSets: [parallel] }));
		expect(b.loadSaved(3)).toBe(true);
		expect(b.form).toBe('parallel');
		rel(b.ki, 0.5, 1e-15);
		rel(b.kd, 1, 1e-15);
		expect(b.filterOn).toBe(false);
		expect(b.loadSaved(99)).toBe(false);
	});

	it('posts the parallel form back as Ti = Kp/Ki and Td = Kd/Kp in the display unit', () => {
		const b = new BenchState(fopdtModel({ savedSets: [parallel], timeUnit: 'min' }));
		b.loadSaved(3);
		const f = b.saveFields({ overshootPercent: 4.2 });
		expect(f).toMatchObject({ controllerType: 'PID', form: 'parallel', timeUnit: 'min', kp: '2', weightB: '1', weightC: '0' });
		rel(Number(f.ti), 4 / 60, 1e-12);
		rel(Number(f.td), 0.5 / 60, 1e-12);
		expect(f.filterN).toBeUndefined();
		expect(JSON.parse(f.predicted)).toEqual({ overshootPercent: 4.2 });
	});

	it('compares at most four sets and refuses a fifth with a message', () => {
		const b = new BenchState(fopdtModel({ savedSets: [parallel] }));
		expect(b.compareSaved(3)).toBeNull();
		expect(b.compareSaved(3)).toMatch(/already/);
		for (let i = 1; i < MAX_COMPARE; i++) expect(b.pinCurrent()).toBeNull();
		expect(b.compare).toHaveLength(MAX_COMPARE);
		expect(b.pinCurrent()).toMatch(/At most 4/);
		b.removeCompare('saved-3');
		expect(b.compare).toHaveLength(MAX_COMPARE - 1);
		expect(b.compare[0].settings.kp).toBeCloseTo(b.kp, 15);
	});
});

describe('helpers', () => {
	it('resample matches numpy.interp inside the source grid and gives null outside', () => {
		const out = resample(ref.interp.tSrc, ref.interp.ySrc, ref.interp.tDst);
		out.forEach((v, i) => rel(v, ref.interp.yDst[i], 1e-12));
		expect(resample([0, 1], [0, 1], [-1, 2])).toEqual([null, null]);
	});

	it('the plot window covers WINDOW_FACTOR × the latest settling or recovery time and nothing for an unstable loop', () => {
		const b = new BenchState(fopdtModel());
		const r = analyze(b.analysisRequest);
		const latest = Math.max(r.stepInfo.settlingTime ?? 0, r.stepInfo.peakTime ?? 0, r.disturbance.info.recoveryTime ?? 0, r.disturbance.info.peakTime ?? 0);
		expect(latest).toBeGreaterThan(0);
		expect(responseWindow([r])).toBeCloseTo(Math.min(r.simulation.tEnd, WINDOW_FACTOR * latest), 12);
		b.setDisplay('kp', 50);
		expect(responseWindow([analyze(b.analysisRequest)])).toBeNull();
		expect(responseWindow([])).toBeNull();
	});

	it('predicted metrics are finite numbers or null, also for an unstable loop', () => {
		const b = new BenchState(fopdtModel());
		b.setDisplay('kp', 50);
		const r = analyze(b.analysisRequest);
		expect(r.closedLoop.stable).toBe(false);
		const p = predictedMetrics(r);
		expect(p.stable).toBe(0);
		expect(p.overshootPercent).toBeNull();
		for (const [k, v] of Object.entries(p)) {
			expect(k).toMatch(/^[A-Za-z][A-Za-z0-9_]{0,39}$/);
			expect(v === null || Number.isFinite(v)).toBe(true);
		}
	});
});
