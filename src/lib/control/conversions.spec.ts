import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	ConversionError,
	convertController,
	gainFromProportionalBand,
	idealToParallel,
	idealToSeries,
	minutesPerRepeatFromRepeatsPerMinute,
	minutesToSeconds,
	parallelToIdeal,
	proportionalBandFromGain,
	repeatsPerMinuteFromMinutesPerRepeat,
	secondsToMinutes,
	seriesToIdeal
} from './conversions';
import reference from './fixtures/tuning-reference.json';

/** Relative closeness for property tests. */
function close(a: number, b: number, rel = 1e-9): boolean {
	return Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));
}

describe('series ↔ ideal (exact for unfiltered D)', () => {
	it('converts the SIMC E2 series PID to ideal form', () => {
		// Skogestad 2003 (J. Process Control 13, 291–309), example E2: series PID Kc = 2/1.54 ≈ 1.30,
		// Ti = 2, Td = 1.2 (paper values from memory, not verified against the paper). Ideal
		// equivalent (2.07792, 3.2, 0.75): [C] computed with SciPy from the series→ideal identity,
		// fixture conversions.w2Ideal from scripts/reference/tuning_reference.py.
		const out = seriesToIdeal({ kp: 2 / 1.54, ti: 2, td: 1.2 });
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value.kp).toBeCloseTo(2.07792, 5);
		expect(out.value.ti).toBeCloseTo(3.2, 12);
		expect(out.value.td).toBeCloseTo(0.75, 12);
		expect(out.value.kp).toBeCloseTo(reference.conversions.w2Ideal.kp, 12);
	});

	it('converts the ideal setting back to the series form of the SIMC E2 example', () => {
		// Same source as above, inverse identity with q = √(1 − 4Td/Ti) = 0.25.
		const out = idealToSeries({ kp: reference.conversions.w2Ideal.kp, ti: 3.2, td: 0.75 });
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value.kp).toBeCloseTo(2 / 1.54, 12);
		expect(out.value.ti).toBeCloseTo(2, 12);
		expect(out.value.td).toBeCloseTo(1.2, 12);
	});

	it('refuses ideal → series when Ti < 4·Td, naming the field, without NaN', () => {
		// Condition Ti ≥ 4Td: real zeros of Kc(TiTd s² + Ti s + 1) need Ti² ≥ 4TiTd (quadratic discriminant, common practice).
		const out = idealToSeries({ kp: 1, ti: 3.9, td: 1 });
		expect(out.ok).toBe(false);
		if (out.ok) return;
		expect(out.field).toBe('td');
		expect(out.reason).toMatch(/Ti ≥ 4·Td/);
		const edge = idealToSeries({ kp: 1, ti: 4, td: 1 });
		expect(edge.ok).toBe(true);
		if (!edge.ok) return;
		// Double zero: Ti′ = Td′ = Ti/2, Kc′ = Kc/2.
		expect(edge.value).toEqual({ kp: 0.5, ti: 2, td: 2 });
	});

	it('leaves PI and PD unchanged (identical in both forms)', () => {
		expect(seriesToIdeal({ kp: 2, ti: 5, td: null })).toEqual({ ok: true, value: { kp: 2, ti: 5, td: null }, warnings: [] });
		expect(idealToSeries({ kp: 2, ti: null, td: 0.4 })).toEqual({ ok: true, value: { kp: 2, ti: null, td: 0.4 }, warnings: [] });
	});

	it('rejects bad times with the field named', () => {
		const out = seriesToIdeal({ kp: 1, ti: -2, td: 1 });
		expect(out.ok).toBe(false);
		if (!out.ok) expect(out.field).toBe('ti');
		const nan = idealToSeries({ kp: Number.NaN, ti: 2, td: 1 });
		expect(nan.ok).toBe(false);
		if (!nan.ok) expect(nan.field).toBe('kp');
	});

	it('round-trips series → ideal → series for Ti′ ≥ Td′ (always Ti ≥ 4Td in ideal form)', () => {
		fc.assert(
			fc.property(
				fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
				fc.double({ min: 1e-3, max: 1e4, noNaN: true }),
				fc.double({ min: 1e-6, max: 1, noNaN: true }),
				(kp, ti, ratio) => {
					const td = ti * ratio;
					const ideal = seriesToIdeal({ kp, ti, td });
					if (!ideal.ok) return false;
					const back = idealToSeries(ideal.value);
					if (!back.ok) return false;
					return close(back.value.kp, kp, 1e-6) && close(back.value.ti!, ti, 1e-6) && close(back.value.td!, td, 1e-5);
				}
			)
		);
	});

	it('round-trips ideal → series → ideal whenever Ti ≥ 4Td', () => {
		fc.assert(
			fc.property(
				fc.double({ min: -1e3, max: 1e3, noNaN: true }).filter((x) => Math.abs(x) > 1e-6),
				fc.double({ min: 1e-3, max: 1e4, noNaN: true }),
				fc.double({ min: 0, max: 0.25, noNaN: true }),
				(kp, ti, ratio) => {
					const td = ti * ratio;
					const series = idealToSeries({ kp, ti, td });
					if (!series.ok) return false;
					const back = seriesToIdeal(series.value);
					if (!back.ok) return false;
					return close(back.value.kp, kp) && close(back.value.ti ?? 0, ti) && close(back.value.td ?? 0, td, 1e-8);
				}
			)
		);
	});
});

describe('ideal ↔ parallel', () => {
	it('converts with Ki = Kc/Ti and Kd = Kc·Td', () => {
		// Standard identity (reference sheet 3.1; Åström & Hägglund 1995, from memory); values [C]
		// fixture conversions.w2Parallel computed with SciPy/numpy.
		const out = idealToParallel({ kp: reference.conversions.w2Ideal.kp, ti: 3.2, td: 0.75 });
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value.ki).toBeCloseTo(reference.conversions.w2Parallel.ki, 12);
		expect(out.value.kd).toBeCloseTo(reference.conversions.w2Parallel.kd, 12);
	});

	it('refuses a zero Kp with I action and an opposite-sign Ki', () => {
		const zero = parallelToIdeal({ kp: 0, ki: 1, kd: 0 });
		expect(zero.ok).toBe(false);
		if (!zero.ok) expect(zero.field).toBe('kp');
		const sign = parallelToIdeal({ kp: 2, ki: -1, kd: 0 });
		expect(sign.ok).toBe(false);
		if (!sign.ok) expect(sign.field).toBe('ki');
	});

	it('round-trips ideal → parallel → ideal', () => {
		fc.assert(
			fc.property(
				fc.double({ min: -1e3, max: 1e3, noNaN: true }).filter((x) => Math.abs(x) > 1e-6),
				fc.double({ min: 1e-3, max: 1e4, noNaN: true }),
				fc.double({ min: 1e-4, max: 1e3, noNaN: true }),
				(kp, ti, td) => {
					const par = idealToParallel({ kp, ti, td });
					if (!par.ok) return false;
					const back = parallelToIdeal(par.value);
					if (!back.ok) return false;
					return close(back.value.kp, kp) && close(back.value.ti!, ti) && close(back.value.td!, td);
				}
			)
		);
	});
});

describe('convertController (bench form switch)', () => {
	it('converts the SIMC E2 series PID to parallel through the ideal form', () => {
		// Source as above (Skogestad 2003 E2; fixture conversions.w2Parallel).
		const out = convertController({ type: 'PID', form: 'series', kp: 2 / 1.54, ti: 2, td: 1.2 }, 'parallel');
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value.form).toBe('parallel');
		expect(out.value.kp).toBeCloseTo(reference.conversions.w2Ideal.kp, 12);
		expect(out.value.ki).toBeCloseTo(reference.conversions.w2Parallel.ki, 12);
		expect(out.value.kd).toBeCloseTo(reference.conversions.w2Parallel.kd, 12);
		expect(out.value.ti).toBeNull();
		expect(out.warnings).toEqual([]);
	});

	it('warns that a derivative filter makes series ↔ ideal inexact', () => {
		const out = convertController({ type: 'PID', form: 'ideal', kp: 2, ti: 8, td: 1, n: 10 }, 'series');
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value.n).toBe(10);
		expect(out.warnings.join(' ')).toMatch(/exact only without a derivative filter/);
		const parallel = convertController({ type: 'PID', form: 'ideal', kp: 2, ti: 8, td: 1, n: 10 }, 'parallel');
		expect(parallel.ok && parallel.warnings.length).toBe(0);
	});

	it('reports the series limit with the field named', () => {
		const out = convertController({ type: 'PID', form: 'parallel', kp: 1, ki: 1, kd: 1 }, 'series');
		expect(out.ok).toBe(false);
		if (!out.ok) expect(out.field).toBe('td');
	});

	it('names missing or bad fields', () => {
		const noTi = convertController({ type: 'PI', form: 'ideal', kp: 1 }, 'parallel');
		expect(!noTi.ok && noTi.field).toBe('ti');
		const noKd = convertController({ type: 'PD', form: 'parallel', kp: 1 }, 'ideal');
		expect(!noKd.ok && noKd.field).toBe('kd');
		const badN = convertController({ type: 'PID', kp: 1, ti: 4, td: 1, n: -1 }, 'series');
		expect(!badN.ok && badN.field).toBe('n');
	});

	it('keeps a P controller as it is and drops unused terms', () => {
		const out = convertController({ type: 'P', form: 'ideal', kp: 3, ti: 99, td: 7 }, 'parallel');
		expect(out.ok).toBe(true);
		if (!out.ok) return;
		expect(out.value).toMatchObject({ type: 'P', form: 'parallel', kp: 3, ki: null, kd: null });
	});
});

describe('proportional band and reset units', () => {
	it('relates Kc = 2 to PB = 50 % and PB = 250 % to Kc = 0.4', () => {
		// PB % = 100/Kc, common practice (reference sheet 3.2 examples).
		expect(proportionalBandFromGain(2)).toBe(50);
		expect(gainFromProportionalBand(250)).toBeCloseTo(0.4, 15);
	});

	it('uses spans for engineering-unit gains', () => {
		// Kc,% = Kc,eng · PV span / output span (common practice): 1 %/°C over a 0–200 °C PV span
		// with a 0–100 % output is Kc = 2, PB = 50 %.
		const spans = { pvSpan: 200, outputSpan: 100 };
		expect(proportionalBandFromGain(1, spans)).toBeCloseTo(50, 12);
		expect(gainFromProportionalBand(50, spans)).toBeCloseTo(1, 12);
	});

	it('converts 0.5 min/repeat = 2 repeats/min = 30 s/repeat', () => {
		// Common practice (reference sheet 3.2 example).
		expect(repeatsPerMinuteFromMinutesPerRepeat(0.5)).toBe(2);
		expect(minutesPerRepeatFromRepeatsPerMinute(2)).toBe(0.5);
		expect(minutesToSeconds(0.5)).toBe(30);
		expect(secondsToMinutes(30)).toBe(0.5);
	});

	it('throws a field-named error instead of returning Infinity or NaN', () => {
		expect(() => proportionalBandFromGain(0)).toThrow(ConversionError);
		try {
			gainFromProportionalBand(50, { pvSpan: 0, outputSpan: 100 });
			expect.unreachable();
		} catch (e) {
			expect((e as ConversionError).field).toBe('pvSpan');
		}
		expect(() => repeatsPerMinuteFromMinutesPerRepeat(0)).toThrow(/minutes per repeat/);
		expect(() => secondsToMinutes(Number.NaN)).toThrow(ConversionError);
	});

	it('round-trips gain → PB → gain, with and without spans', () => {
		fc.assert(
			fc.property(
				fc.double({ min: -1e4, max: 1e4, noNaN: true }).filter((x) => Math.abs(x) > 1e-6),
				fc.double({ min: 1e-3, max: 1e5, noNaN: true }),
				fc.double({ min: 1e-3, max: 1e5, noNaN: true }),
				(gain, pvSpan, outputSpan) => {
					const spans = { pvSpan, outputSpan };
					return (
						close(gainFromProportionalBand(proportionalBandFromGain(gain)), gain) &&
						close(gainFromProportionalBand(proportionalBandFromGain(gain, spans), spans), gain)
					);
				}
			)
		);
	});
});
