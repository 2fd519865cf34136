/**
 * Controller form and unit conversions: series ↔ ideal ↔ parallel PID settings, proportional
 * band ↔ gain, seconds ↔ minutes and repeats/min ↔ min/repeat.
 *
 * Form algebra (from memory): Åström & Hägglund, PID Controllers: Theory, Design and Tuning (ISA 1995),
 * section 3.4 (interacting ↔ non-interacting forms). The conversions are exact for an unfiltered
 * derivative only; with a filter N the filter acts on different terms in the series form.
 * Units: times in seconds, gains in controller units (output per unit of error) unless stated.
 */
import type { ControllerForm, ControllerSettings, ControllerType } from './types';

/** Proportional, integral and derivative settings of an ideal or series controller; ti/td in seconds, null where unused. */
export interface PidTimes {
	kp: number;
	ti: number | null;
	td: number | null;
}

/** Parallel (independent) gains: kp dimensionless, ki in 1/s, kd in s (all in gain units). */
export interface ParallelGains {
	kp: number;
	ki: number;
	kd: number;
}

/** A conversion either succeeds with a value (and notes) or fails with a reason naming the field. */
export type ConversionOutcome<T> =
	| { ok: true; value: T; warnings: string[] }
	| { ok: false; reason: string; field: string };

/** Thrown by the unit conversions when an input cannot be converted; `field` names the input. */
export class ConversionError extends Error {
	readonly field: string;
	constructor(field: string, message: string) {
		super(message);
		this.name = 'ConversionError';
		this.field = field;
	}
}

const FILTER_WARNING =
	'The series ↔ ideal conversion is exact only without a derivative filter; with N set, the filter acts on different terms, so the converted controller differs slightly at high frequency.';

function isUnused(x: number | null | undefined): x is null | undefined {
	return x === null || x === undefined;
}

type Failure = { ok: false; reason: string; field: string };

function fail(field: string, reason: string): Failure {
	return { ok: false, field, reason };
}

function checkTimes(g: PidTimes): Failure | null {
	if (!Number.isFinite(g.kp)) return fail('kp', 'Kp must be a finite number.');
	if (!isUnused(g.ti) && !(Number.isFinite(g.ti) && g.ti > 0))
		return fail('ti', 'Ti must be a positive number of seconds.');
	if (!isUnused(g.td) && !(Number.isFinite(g.td) && g.td >= 0))
		return fail('td', 'Td must be zero or a positive number of seconds.');
	return null;
}

/**
 * Series (interacting) Kc′(1 + 1/(Ti′s))(1 + Td′s) → ideal Kc(1 + 1/(Tis) + Tds).
 * Kc = Kc′(1 + Td′/Ti′), Ti = Ti′ + Td′, Td = Ti′Td′/(Ti′ + Td′) — Åström & Hägglund 1995, §3.4, from memory.
 * Always possible; PI and PD are the same in both forms. Times in seconds.
 */
export function seriesToIdeal(series: PidTimes): ConversionOutcome<PidTimes> {
	const bad = checkTimes(series);
	if (bad) return bad;
	const { kp, ti, td } = series;
	if (isUnused(ti) || isUnused(td) || td === 0) {
		return { ok: true, value: { kp, ti: ti ?? null, td: td ?? null }, warnings: [] };
	}
	return {
		ok: true,
		value: { kp: kp * (1 + td / ti), ti: ti + td, td: (ti * td) / (ti + td) },
		warnings: []
	};
}

/**
 * Ideal → series. The series form has two real zeros, so it can represent an ideal PID only when
 * Ti ≥ 4·Td (checked with a relative slack of 1e-9 for rounding); otherwise the outcome is not ok with the reason. With q = √(1 − 4Td/Ti):
 * Kc′ = Kc(1 + q)/2, Ti′ = Ti(1 + q)/2, Td′ = Ti(1 − q)/2 — Åström & Hägglund 1995, §3.4, from memory.
 */
export function idealToSeries(ideal: PidTimes): ConversionOutcome<PidTimes> {
	const bad = checkTimes(ideal);
	if (bad) return bad;
	const { kp, ti, td } = ideal;
	if (isUnused(ti) || isUnused(td) || td === 0) {
		return { ok: true, value: { kp, ti: ti ?? null, td: td ?? null }, warnings: [] };
	}
	// Relative slack of 1e-9 so that a double zero (Ti = 4Td) survives rounding in a round trip.
	if (4 * td > ti * (1 + 1e-9)) {
		return fail(
			'td',
			`The series form has real zeros and can represent an ideal PID only when Ti ≥ 4·Td; here Ti = ${fmt(ti)} s and 4·Td = ${fmt(4 * td)} s.`
		);
	}
	const q = Math.sqrt(Math.max(0, 1 - (4 * td) / ti));
	return {
		ok: true,
		value: { kp: (kp * (1 + q)) / 2, ti: (ti * (1 + q)) / 2, td: (ti * (1 - q)) / 2 },
		warnings: []
	};
}

/**
 * Ideal → parallel: Kp = Kc, Ki = Kc/Ti (1/s), Kd = Kc·Td (s); unused terms give 0.
 * Standard identity (Åström & Hägglund 1995, §3.4, from memory); exact, also with the filter of types.ts.
 */
export function idealToParallel(ideal: PidTimes): ConversionOutcome<ParallelGains> {
	const bad = checkTimes(ideal);
	if (bad) return bad;
	const { kp, ti, td } = ideal;
	return {
		ok: true,
		value: { kp, ki: isUnused(ti) ? 0 : kp / ti, kd: isUnused(td) ? 0 : kp * td },
		warnings: []
	};
}

/**
 * Parallel → ideal: Kc = Kp, Ti = Kp/Ki, Td = Kd/Kp (seconds); Ki = 0 gives no I term, Kd = 0 no D term.
 * Not possible when Kp = 0 with I or D action, or when Ki or Kd has the opposite sign of Kp
 * (negative Ti/Td). Standard identity (Åström & Hägglund 1995, §3.4, from memory).
 */
export function parallelToIdeal(parallel: ParallelGains): ConversionOutcome<PidTimes> {
	const { kp, ki, kd } = parallel;
	if (!Number.isFinite(kp)) return fail('kp', 'Kp must be a finite number.');
	if (!Number.isFinite(ki)) return fail('ki', 'Ki must be a finite number.');
	if (!Number.isFinite(kd)) return fail('kd', 'Kd must be a finite number.');
	if (kp === 0 && (ki !== 0 || kd !== 0)) {
		return fail('kp', 'The ideal and series forms need a nonzero Kp when Ki or Kd is set.');
	}
	if (ki !== 0 && ki * kp < 0) {
		return fail('ki', 'Ki must have the same sign as Kp (a negative integral time is not a valid setting).');
	}
	if (kd !== 0 && kd * kp < 0) {
		return fail('kd', 'Kd must have the same sign as Kp (a negative derivative time is not a valid setting).');
	}
	return {
		ok: true,
		value: { kp, ti: ki === 0 ? null : kp / ki, td: kd === 0 ? null : kd / kp },
		warnings: []
	};
}

function hasIntegral(type: ControllerType): boolean {
	return type === 'PI' || type === 'PID';
}

function hasDerivative(type: ControllerType): boolean {
	return type === 'PD' || type === 'PID';
}

function fmt(x: number): string {
	return Number(x.toPrecision(6)).toString();
}

/**
 * Converts controller settings to another form (ideal, series or parallel) for the bench.
 * Exact for an unfiltered derivative; when N is set and the series form is involved the result
 * carries a warning (the filter sits on different terms). Set-point weights b, c and N are
 * carried over unchanged. Fails with a reason naming the field when the settings are invalid or
 * the target form cannot represent them (series needs Ti ≥ 4·Td). Times in seconds.
 */
export function convertController(
	settings: ControllerSettings,
	toForm: ControllerForm
): ConversionOutcome<ControllerSettings> {
	const type = settings.type;
	if (!['P', 'PI', 'PD', 'PID'].includes(type)) return fail('type', 'Controller type must be P, PI, PD or PID.');
	const from: ControllerForm = settings.form ?? 'ideal';
	if (!['ideal', 'series', 'parallel'].includes(from)) return fail('form', 'Form must be ideal, series or parallel.');
	if (!['ideal', 'series', 'parallel'].includes(toForm)) return fail('form', 'Target form must be ideal, series or parallel.');
	const n = settings.n ?? null;
	if (n !== null && !(Number.isFinite(n) && n > 0)) return fail('n', 'N must be a positive number.');
	const warnings: string[] = [];

	// Step 1: settings → ideal times.
	let ideal: PidTimes;
	if (from === 'parallel') {
		const ki = hasIntegral(type) ? settings.ki : 0;
		const kd = hasDerivative(type) ? settings.kd : 0;
		if (hasIntegral(type) && isUnused(ki)) return fail('ki', `A ${type} controller in parallel form needs Ki.`);
		if (hasDerivative(type) && isUnused(kd)) return fail('kd', `A ${type} controller in parallel form needs Kd.`);
		if (hasIntegral(type) && ki === 0) return fail('ki', `A ${type} controller needs a nonzero Ki.`);
		const out = parallelToIdeal({ kp: settings.kp, ki: ki ?? 0, kd: kd ?? 0 });
		if (!out.ok) return out;
		ideal = out.value;
	} else {
		const ti = hasIntegral(type) ? settings.ti : null;
		const td = hasDerivative(type) ? settings.td : null;
		if (hasIntegral(type) && isUnused(ti)) return fail('ti', `A ${type} controller needs Ti.`);
		if (hasDerivative(type) && isUnused(td)) return fail('td', `A ${type} controller needs Td.`);
		const given: PidTimes = { kp: settings.kp, ti: ti ?? null, td: td ?? null };
		if (from === 'series') {
			const out = seriesToIdeal(given);
			if (!out.ok) return out;
			ideal = out.value;
		} else {
			const bad = checkTimes(given);
			if (bad) return bad;
			ideal = given;
		}
	}

	// Step 2: ideal → target form.
	const common = { type, form: toForm, n, b: settings.b ?? null, c: settings.c ?? null };
	const seriesInvolved = from === 'series' || toForm === 'series';
	if (seriesInvolved && from !== toForm && n !== null && hasDerivative(type) && hasIntegral(type)) {
		warnings.push(FILTER_WARNING);
	}
	if (toForm === 'parallel') {
		const out = idealToParallel(ideal);
		if (!out.ok) return out;
		return {
			ok: true,
			value: {
				...common,
				kp: out.value.kp,
				ki: hasIntegral(type) ? out.value.ki : null,
				kd: hasDerivative(type) ? out.value.kd : null,
				ti: null,
				td: null
			},
			warnings
		};
	}
	let times = ideal;
	if (toForm === 'series') {
		const out = idealToSeries(ideal);
		if (!out.ok) return out;
		times = out.value;
	}
	return {
		ok: true,
		value: { ...common, kp: times.kp, ti: times.ti, td: times.td, ki: null, kd: null },
		warnings
	};
}

/** Optional spans to express a gain in engineering units (output units per PV unit). */
export interface GainSpans {
	/** Span of the process variable (measurement range), PV units. */
	pvSpan: number;
	/** Span of the controller output, output units (e.g. 100 for %). */
	outputSpan: number;
}

function checkSpans(spans: GainSpans | undefined): void {
	if (!spans) return;
	if (!(Number.isFinite(spans.pvSpan) && spans.pvSpan > 0))
		throw new ConversionError('pvSpan', 'The PV span must be a positive number.');
	if (!(Number.isFinite(spans.outputSpan) && spans.outputSpan > 0))
		throw new ConversionError('outputSpan', 'The output span must be a positive number.');
}

/**
 * Proportional band in % from a controller gain: PB = 100/Kc with Kc dimensionless
 * (% output per % PV); with spans, Kc = Kc,eng·(PV span / output span) first. The sign of the
 * gain (controller action) is kept. Common practice (e.g. Liptak, Instrument Engineers' Handbook).
 */
export function proportionalBandFromGain(gain: number, spans?: GainSpans): number {
	if (!Number.isFinite(gain) || gain === 0)
		throw new ConversionError('kp', 'The gain must be a nonzero finite number (a zero gain has no proportional band).');
	checkSpans(spans);
	const dimensionless = spans ? (gain * spans.pvSpan) / spans.outputSpan : gain;
	return 100 / dimensionless;
}

/**
 * Controller gain from a proportional band in %: Kc = 100/PB (dimensionless); with spans the
 * result is in engineering units, Kc,eng = Kc·(output span / PV span). Common practice.
 */
export function gainFromProportionalBand(bandPercent: number, spans?: GainSpans): number {
	if (!Number.isFinite(bandPercent) || bandPercent === 0)
		throw new ConversionError('proportionalBand', 'The proportional band must be a nonzero finite percentage.');
	checkSpans(spans);
	const dimensionless = 100 / bandPercent;
	return spans ? (dimensionless * spans.outputSpan) / spans.pvSpan : dimensionless;
}

function checkTime(field: string, value: number): void {
	if (!Number.isFinite(value)) throw new ConversionError(field, `${field} must be a finite number.`);
}

/** Seconds → minutes (÷ 60). */
export function secondsToMinutes(seconds: number): number {
	checkTime('seconds', seconds);
	return seconds / 60;
}

/** Minutes → seconds (× 60). */
export function minutesToSeconds(minutes: number): number {
	checkTime('minutes', minutes);
	return minutes * 60;
}

/** Reset rate in repeats/min from an integral time in min/repeat: 1/Ti. Common practice. */
export function repeatsPerMinuteFromMinutesPerRepeat(minutesPerRepeat: number): number {
	if (!(Number.isFinite(minutesPerRepeat) && minutesPerRepeat > 0))
		throw new ConversionError('minutesPerRepeat', 'The integral time must be a positive number of minutes per repeat.');
	return 1 / minutesPerRepeat;
}

/** Integral time in min/repeat from a reset rate in repeats/min: 1/rate. Common practice. */
export function minutesPerRepeatFromRepeatsPerMinute(repeatsPerMinute: number): number {
	if (!(Number.isFinite(repeatsPerMinute) && repeatsPerMinute > 0))
		throw new ConversionError('repeatsPerMinute', 'The reset rate must be a positive number of repeats per minute.');
	return 1 / repeatsPerMinute;
}
