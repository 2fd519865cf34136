/**
 * The bench's state as a rune class: the plant of one model revision, the controller being tried
 * (type, form, Kp or proportional band, Ti/Td or Ki/Kd, derivative filter N, set-point weights
 * b and c), the display time unit, step sizes, the robustness envelope and pole-sweep choices and
 * up to four comparison sets. It builds the `analyze()` requests (what goes to the worker) and
 * the values of the save form. Times are kept in seconds; the display unit only changes what the
 * fields show. Every form and unit conversion goes through the engine (`src/lib/control`).
 */
import {
	convertController,
	gainFromProportionalBand,
	proportionalBandFromGain,
	recognisePlant,
	type AnalysisRequest,
	type AnalysisResponse,
	type ControllerForm,
	type ControllerSettings,
	type ControllerType,
	type PlantStructure,
	type TuningRuleId
} from '../control';
import { logScaleAround, niceStep, plantEffectiveGain, plantTimeScale, positionOf, valueAt, widenToInclude, type SliderScale } from './scales';
import { rulePlantFor, ruleRows } from './rules';

/** Samples of the bench's time responses (the engine's metrics use its finer internal grid). */
export const BENCH_POINTS = 600;
/** Points of the Bode plot. */
export const BODE_POINTS = 200;
/** Values per pole-sweep trail. */
export const SWEEP_COUNT = 41;
/** At most this many tuning sets on the comparison plot. */
export const MAX_COMPARE = 4;
/** Default derivative filter N: 10 (typical range 5–20; common practice, Åström & Hägglund 1995, from memory). */
export const DEFAULT_FILTER_N = 10;

/** The display time unit of the bench (the model's, or the person's choice). */
export type TimeUnit = 's' | 'min';
/** Settings the bench edits; `band` is the proportional band in %, the others as in ControllerSettings. */
export type ParamKey = 'kp' | 'band' | 'ti' | 'td' | 'ki' | 'kd' | 'n' | 'b' | 'c';
/** What the pole sweep varies: the gain, or the integral or derivative setting of the form. */
export type SweepChoice = 'kp' | 'integral' | 'derivative';

/** A signal of the model: name, engineering unit and range (span = max − min). */
export interface BenchSignal {
	name: string;
	unit: string;
	min: number;
	max: number;
}

/** A saved tuning set as the model page lists it (times in seconds; parallel sets store Ti = Kp/Ki, Td = Kd/Kp). */
export interface SavedTuningSet {
	id: number;
	loopTag: string;
	state: string;
	controllerType: string;
	form: string;
	kp: number;
	tiSeconds: number | null;
	tdSeconds: number | null;
	filterN: number | null;
	rule: string | null;
	ruleParameter: number | null;
}

/** What the bench needs from the model page. */
export interface BenchModelInput {
	/** num/den in descending powers of s (seconds), dead time in seconds. */
	plant: { num: number[]; den: number[]; delay: number };
	timeUnit: TimeUnit;
	pv: BenchSignal;
	mv: BenchSignal;
	savedSets?: SavedTuningSet[];
}

/** Where the current settings came from; `edited` turns true when changed by hand afterwards. */
export type SettingsOrigin =
	| { kind: 'manual' }
	| { kind: 'rule'; rule: TuningRuleId; name: string; parameter: number | null }
	| { kind: 'saved'; id: number; label: string; rule: string | null; parameter: number | null }
	| { kind: 'design'; summary: string };

/** A tuning set on the comparison plot. */
export interface CompareSet {
	key: string;
	label: string;
	settings: ControllerSettings;
}

/** A note next to the form field: an error (nothing changed) or information about a conversion. */
export interface FormNote {
	kind: 'error' | 'info';
	text: string;
}

const CONTROLLER_TYPES: readonly ControllerType[] = ['P', 'PI', 'PD', 'PID'];
const FORMS: readonly ControllerForm[] = ['ideal', 'series', 'parallel'];

/** True when the controller type has integral action. */
export const hasIntegral = (t: ControllerType) => t === 'PI' || t === 'PID';
/** True when the controller type has derivative action. */
export const hasDerivative = (t: ControllerType) => t === 'PD' || t === 'PID';

/** Seconds per display unit (1 for s, 60 for min — SI). */
export const secondsPer = (unit: TimeUnit) => (unit === 'min' ? 60 : 1);

/** The controller settings of a saved tuning set (parallel sets: Ki = Kp/Ti, Kd = Kp·Td, as the schema stores them). */
export function savedSetSettings(s: SavedTuningSet): ControllerSettings {
	const type = (CONTROLLER_TYPES as readonly string[]).includes(s.controllerType) ? (s.controllerType as ControllerType) : 'PI';
	const form = (FORMS as readonly string[]).includes(s.form) ? (s.form as ControllerForm) : 'ideal';
	const n = hasDerivative(type) ? s.filterN : null;
	if (form === 'parallel') {
		return {
			type,
			form,
			kp: s.kp,
			ki: hasIntegral(type) && s.tiSeconds ? s.kp / s.tiSeconds : null,
			kd: hasDerivative(type) && s.tdSeconds !== null ? s.kp * s.tdSeconds : null,
			n
		};
	}
	return { type, form, kp: s.kp, ti: hasIntegral(type) ? s.tiSeconds : null, td: hasDerivative(type) ? s.tdSeconds : null, n };
}

/** A short label of a saved tuning set for selects and legends. */
export function savedSetLabel(s: SavedTuningSet): string {
	return `${s.loopTag} · ${s.controllerType} ${s.form}${s.rule ? ` · ${s.rule}` : ''} · ${s.state.replace(/_/g, ' ')} #${s.id}`;
}

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/** The controller settings in one line, for legends and pinned sets (times in `unit`). */
export function settingsSummary(s: ControllerSettings, unit: TimeUnit): string {
	const f = secondsPer(unit);
	const parts = [`${s.type}`, `Kp ${fmt(s.kp)}`];
	if (s.form === 'parallel') {
		if (hasIntegral(s.type) && s.ki != null) parts.push(`Ki ${fmt(s.ki * f)}/${unit}`);
		if (hasDerivative(s.type) && s.kd != null) parts.push(`Kd ${fmt(s.kd / f)} ${unit}`);
	} else {
		if (hasIntegral(s.type) && s.ti != null) parts.push(`Ti ${fmt(s.ti / f)} ${unit}`);
		if (hasDerivative(s.type) && s.td != null) parts.push(`Td ${fmt(s.td / f)} ${unit}`);
	}
	if (s.form && s.form !== 'ideal') parts.push(s.form);
	return parts.join(' · ');
}

/**
 * Predicted metrics to store with a tuning set: per unit set-point step, seconds, rad/s, degrees
 * (metric name → finite number or null), straight from the analysis response.
 */
export function predictedMetrics(r: AnalysisResponse): Record<string, number | null> {
	const v = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? x : null);
	return {
		stable: r.closedLoop.stable ? 1 : 0,
		riseTime: v(r.stepInfo.riseTime),
		peakTime: v(r.stepInfo.peakTime),
		overshootPercent: v(r.stepInfo.overshootPercent),
		settlingTime: v(r.stepInfo.settlingTime),
		settlingBand: v(r.stepInfo.settlingBand),
		steadyStateError: v(r.stepInfo.steadyStateError),
		iae: v(r.stepInfo.iae),
		peakMv: v(r.stepInfo.peakMv),
		loadPeak: v(r.disturbance.info.peak),
		loadRecoveryTime: v(r.disturbance.info.recoveryTime),
		gainMargin: v(r.margins.gainMargin),
		phaseMargin: v(r.margins.phaseMargin),
		delayMargin: v(r.margins.delayMargin),
		ms: v(r.margins.ms),
		zeta: v(r.dominant?.zeta),
		wn: v(r.dominant?.wn)
	};
}

/**
 * Linear interpolation of (tSrc, ySrc) at the times tDst (tSrc ascending), like numpy.interp but
 * null outside [tSrc[0], tSrc[last]] (no extrapolation) — to draw a trace on another grid.
 */
export function resample(tSrc: ArrayLike<number>, ySrc: ArrayLike<number | null>, tDst: ArrayLike<number>): (number | null)[] {
	const out: (number | null)[] = new Array(tDst.length);
	const n = Math.min(tSrc.length, ySrc.length);
	let j = 0;
	for (let i = 0; i < tDst.length; i++) {
		const t = tDst[i];
		if (n === 0 || t < tSrc[0] || t > tSrc[n - 1]) {
			out[i] = null;
			continue;
		}
		while (j < n - 2 && tSrc[j + 1] < t) j++;
		const t0 = tSrc[j];
		const t1 = tSrc[Math.min(j + 1, n - 1)];
		const y0 = ySrc[j];
		const y1 = ySrc[Math.min(j + 1, n - 1)];
		if (y0 === null || y1 === null) out[i] = null;
		else out[i] = t1 === t0 ? y0 : y0 + ((y1 - y0) * (t - t0)) / (t1 - t0);
	}
	return out;
}

/** Multiple of the slowest settling, recovery or peak time that the time plots show. */
export const WINDOW_FACTOR = 2.5;

/**
 * End of the time plots' window in seconds: WINDOW_FACTOR times the latest settling, load
 * recovery or peak time over the given responses (so every trace has settled inside it), never
 * beyond the simulated time of the first. Null (show everything) when the first loop is unstable
 * or none of those times exists.
 */
export function responseWindow(responses: readonly AnalysisResponse[]): number | null {
	const first = responses[0];
	if (!first || !first.closedLoop.stable) return null;
	let latest = 0;
	for (const r of responses) {
		for (const t of [r.stepInfo.settlingTime, r.stepInfo.peakTime, r.disturbance.info.recoveryTime, r.disturbance.info.peakTime]) {
			if (typeof t === 'number' && Number.isFinite(t) && t > latest) latest = t;
		}
	}
	if (!(latest > 0)) return null;
	return Math.min(first.simulation.tEnd, WINDOW_FACTOR * latest);
}

type ScaleKey = 'kp' | 'ti' | 'td' | 'ki' | 'kd' | 'n' | 'b' | 'c';

/**
 * The bench state. Construct with the model's data; components bind to its fields and call its
 * methods. Setters return an error message (and change nothing) for invalid input.
 */
export class BenchState {
	readonly plant: { num: number[]; den: number[]; delay: number };
	readonly structure: PlantStructure;
	readonly pv: BenchSignal;
	readonly mv: BenchSignal;
	/** Saved tuning sets of the model (updated after a save). */
	savedSets = $state<SavedTuningSet[]>([]);
	/** Characteristic time (s) and effective gain the sliders are centred on. */
	readonly timeScale: number;
	readonly effectiveGain: number | null;

	type = $state<ControllerType>('PI');
	form = $state<ControllerForm>('ideal');
	/** Controller gain in MV units per PV unit (sign = controller action). */
	kp = $state(1);
	/** Integral and derivative times (s) of the ideal and series forms. */
	ti = $state(60);
	td = $state(10);
	/** Parallel gains: ki in 1/s, kd in s (gain units). */
	ki = $state(1 / 60);
	kd = $state(10);
	filterOn = $state(true);
	n = $state(DEFAULT_FILTER_N);
	b = $state(1);
	c = $state(0);
	gainMode = $state<'gain' | 'band'>('gain');
	timeUnit = $state<TimeUnit>('s');
	/** Set-point step in PV units and load step at the plant input in MV units (the responses are linear). */
	spStep = $state(1);
	loadStep = $state(1);
	settlingBand = $state(0.02);
	robust = $state({ enabled: false, gainPercent: 20, delayPercent: 30, timeConstantPercent: 20 });
	sweep = $state<SweepChoice>('kp');
	compare = $state<CompareSet[]>([]);
	origin = $state<SettingsOrigin>({ kind: 'manual' });
	edited = $state(false);
	formNote = $state<FormNote | null>(null);
	fieldErrors = $state<Partial<Record<ParamKey | 'spStep' | 'loadStep' | 'robust' | 'compare', string>>>({});
	scales = $state<Record<ScaleKey, SliderScale>>({
		kp: logScaleAround(1, 1.5, 1.5),
		ti: logScaleAround(60, 2, 1.5),
		td: logScaleAround(10, 2.5, 1),
		ki: logScaleAround(1 / 60, 2.5, 2.5),
		kd: logScaleAround(10, 2.5, 2.5),
		n: { kind: 'log', min: 1, max: 100 },
		b: { kind: 'linear', min: 0, max: 1 },
		c: { kind: 'linear', min: 0, max: 1 }
	});
	#pinCounter = 0;

	constructor(input: BenchModelInput) {
		this.plant = { num: [...input.plant.num], den: [...input.plant.den], delay: input.plant.delay ?? 0 };
		this.structure = recognisePlant({ num: this.plant.num, den: this.plant.den, delay: this.plant.delay });
		this.pv = input.pv;
		this.mv = input.mv;
		this.savedSets = input.savedSets ?? [];
		this.timeUnit = input.timeUnit;
		this.timeScale = plantTimeScale(this.plant.den, this.plant.delay, this.plant.num);
		this.effectiveGain = plantEffectiveGain(this.plant.num, this.plant.den, this.plant.delay);
		const pvSpan = this.pv.max - this.pv.min;
		const mvSpan = this.mv.max - this.mv.min;
		this.spStep = niceStep(pvSpan * 0.05);
		this.loadStep = niceStep(mvSpan * 0.05);
		this.#initialSettings();
	}

	/** Spans for the proportional band (PV span, output span), or null when a span is not positive. */
	get spans(): { pvSpan: number; outputSpan: number } | null {
		const pvSpan = this.pv.max - this.pv.min;
		const outputSpan = this.mv.max - this.mv.min;
		return Number.isFinite(pvSpan) && pvSpan > 0 && Number.isFinite(outputSpan) && outputSpan > 0 ? { pvSpan, outputSpan } : null;
	}

	/** Unit of the controller gain: MV units per PV unit. */
	get gainUnit(): string {
		const wrap = (u: string) => (/[/·*\s]/.test(u.trim()) ? `(${u.trim()})` : u.trim());
		return `${wrap(this.mv.unit)}/${wrap(this.pv.unit)}`;
	}

	#initialSettings() {
		const T = this.timeScale;
		const sign = this.effectiveGain !== null && this.effectiveGain < 0 ? -1 : 1;
		const kpRef = this.effectiveGain !== null ? 0.5 / Math.abs(this.effectiveGain) : 1;
		// Defaults from the plant (SIMC-like with τc = θ = T: Kp = 1/(2·K·T) per unit of effective
		// gain; Ti = T, or 8T with an integrator — Skogestad 2003); replaced below by a saved tuning
		// set or a published rule where one applies.
		const d = this.plant.den;
		const integrating = d.length > 1 && d[d.length - 1] === 0;
		const ti = integrating ? 8 * T : T;
		this.#applyRaw({ type: 'PI', form: 'ideal', kp: sign * kpRef, ti, td: ti / 8, n: DEFAULT_FILTER_N });
		this.#centreScales(Math.abs(this.kp), T);
		const approved = this.savedSets.find((s) => s.state === 'approved');
		if (approved) {
			this.loadSaved(approved.id);
			this.#centreScales(Math.abs(this.kp), T);
			return;
		}
		const rp = rulePlantFor(this.structure, 'PI');
		if (rp.ok) {
			const rows = ruleRows(rp.plant, 'PI', 'ideal', null);
			const pick = rows.find((r) => r.rule === 'simc' && r.settings) ?? rows.find((r) => r.settings);
			if (pick?.settings) {
				this.loadSettings(pick.settings, { kind: 'rule', rule: pick.rule, name: pick.name, parameter: pick.parameter });
				this.td = (this.ti ?? T) / 8;
				this.kd = this.kp * this.td;
			}
		}
		this.#centreScales(Math.abs(this.kp), T);
	}

	#centreScales(kpAbs: number, T: number) {
		const kp = Number.isFinite(kpAbs) && kpAbs > 0 ? kpAbs : 1;
		this.scales.kp = logScaleAround(kp, 1.5, 1.5);
		this.scales.ti = widenToInclude(logScaleAround(T, 2, 1.5), this.ti);
		this.scales.td = widenToInclude(logScaleAround(T, 2.5, 1), this.td);
		this.scales.ki = widenToInclude(logScaleAround(kp / T, 2.5, 2.5), Math.abs(this.ki));
		this.scales.kd = widenToInclude(logScaleAround(kp * T, 2.5, 2.5), Math.abs(this.kd));
	}

	/** The controller settings in the current form (seconds), exactly what goes to `analyze`. */
	get controller(): ControllerSettings {
		const type = this.type;
		const base = { type, form: this.form, kp: this.kp, n: hasDerivative(type) && this.filterOn ? this.n : null, b: this.b, c: this.c };
		if (this.form === 'parallel') return { ...base, ki: hasIntegral(type) ? this.ki : null, kd: hasDerivative(type) ? this.kd : null };
		return { ...base, ti: hasIntegral(type) ? this.ti : null, td: hasDerivative(type) ? this.td : null };
	}

	/** The main analysis request: closed loop, step and load responses, metrics, Bode and margins. */
	get analysisRequest(): AnalysisRequest {
		return {
			plant: { num: this.plant.num, den: this.plant.den, delay: this.plant.delay },
			controller: this.controller,
			options: { points: BENCH_POINTS, bodePoints: BODE_POINTS, settlingBand: this.settlingBand }
		};
	}

	/** The sweep parameter for the current form and type (falls back to the gain when the chosen term is absent). */
	get sweepParameter(): 'kp' | 'ti' | 'td' | 'ki' | 'kd' {
		const p = this.form === 'parallel';
		if (this.sweep === 'integral' && hasIntegral(this.type)) return p ? 'ki' : 'ti';
		if (this.sweep === 'derivative' && hasDerivative(this.type)) return p ? 'kd' : 'td';
		return 'kp';
	}

	/**
	 * The slower request: pole trails over the sweep parameter's slider range (log scale) and,
	 * when switched on, the robustness envelope. For a negative gain the plant and the gains are
	 * both negated: the loop C·G, hence its poles and the PV envelope, are unchanged, and the
	 * log sweep runs over positive values.
	 */
	get extraRequest(): AnalysisRequest {
		const c = this.controller;
		const flip = c.kp < 0 ? -1 : 1;
		const controller: ControllerSettings = {
			...c,
			kp: flip * c.kp,
			ki: c.ki == null ? c.ki : flip * c.ki,
			kd: c.kd == null ? c.kd : flip * c.kd
		};
		const param = this.sweepParameter;
		const scale = this.scales[param];
		const req: AnalysisRequest = {
			plant: { num: this.plant.num.map((x) => flip * x), den: this.plant.den, delay: this.plant.delay },
			controller,
			options: { points: BENCH_POINTS, bodePoints: 40, settlingBand: this.settlingBand },
			sweep: { parameter: param, from: scale.min, to: scale.max, count: SWEEP_COUNT, scale: 'log' }
		};
		if (this.robust.enabled) {
			req.uncertainty = {
				gainPercent: this.robust.gainPercent,
				delayPercent: this.plant.delay > 0 ? this.robust.delayPercent : 0,
				timeConstantPercent: this.robust.timeConstantPercent
			};
		}
		return req;
	}

	/** The request for one comparison set, simulated to `tEnd` seconds (to cover the main plot's window). */
	compareRequest(set: CompareSet, tEnd: number): AnalysisRequest {
		return {
			plant: { num: this.plant.num, den: this.plant.den, delay: this.plant.delay },
			controller: set.settings,
			options: { points: BENCH_POINTS, bodePoints: 40, settlingBand: this.settlingBand, tEnd }
		};
	}

	// ---- values as the fields show them -------------------------------------------------------

	/** Proportional band in % for the current gain, or null (with no spans or a zero gain). */
	get band(): number | null {
		const spans = this.spans;
		if (!spans) return null;
		try {
			return proportionalBandFromGain(this.kp, spans);
		} catch {
			return null;
		}
	}

	/** Reset rate in repeats per minute (60/Ti[s], or 60·Ki/Kp in parallel form), or null without integral action. */
	get repeatsPerMinute(): number | null {
		if (!hasIntegral(this.type)) return null;
		if (this.form === 'parallel') return this.kp !== 0 ? (60 * this.ki) / this.kp : null;
		return this.ti > 0 ? 60 / this.ti : null;
	}

	/** The value of a field in display units: Kp in gain units, band in %, times in the display unit, Ki per display unit. */
	display(key: ParamKey): number | null {
		const f = secondsPer(this.timeUnit);
		switch (key) {
			case 'kp':
				return this.kp;
			case 'band':
				return this.band;
			case 'ti':
				return this.ti / f;
			case 'td':
				return this.td / f;
			case 'ki':
				return this.ki * f;
			case 'kd':
				return this.kd / f;
			case 'n':
				return this.n;
			case 'b':
				return this.b;
			case 'c':
				return this.c;
		}
	}

	/** The slider scale of a field (in seconds-based units; the band uses the gain's scale, inverted). */
	scaleOf(key: ParamKey): SliderScale {
		if (key === 'band') {
			const s = this.scales.kp;
			const spans = this.spans;
			if (!spans) return s;
			return { kind: 'log', min: Math.abs(proportionalBandFromGain(s.max, spans)), max: Math.abs(proportionalBandFromGain(s.min, spans)) };
		}
		return this.scales[key];
	}

	/** The slider position (0…SLIDER_STEPS) of a field. */
	position(key: ParamKey): number {
		const s = this.scaleOf(key);
		switch (key) {
			case 'band':
				return positionOf(s, Math.abs(this.band ?? 0));
			case 'kp':
				return positionOf(s, Math.abs(this.kp));
			case 'ki':
				return positionOf(s, Math.abs(this.ki));
			case 'kd':
				return positionOf(s, Math.abs(this.kd));
			default:
				return positionOf(s, this[key]);
		}
	}

	/** Moves a slider: the value at that position, keeping the gain's sign (controller action). */
	setPosition(key: ParamKey, position: number): void {
		const v = valueAt(this.scaleOf(key), position);
		const sign = this.kp < 0 ? -1 : 1;
		switch (key) {
			case 'kp':
				this.#commit('kp', sign * v);
				return;
			case 'band': {
				const spans = this.spans;
				if (spans) this.#commit('kp', gainFromProportionalBand(sign * v, spans));
				return;
			}
			case 'ki':
				this.#commit('ki', sign * v);
				return;
			case 'kd':
				this.#commit('kd', sign * v);
				return;
			default:
				this.#commit(key, v);
		}
	}

	/**
	 * Sets a field from a value in display units (as typed). Returns the error message, or null
	 * when the value was taken. Invalid values change nothing and leave the message in
	 * `fieldErrors[key]`.
	 */
	setDisplay(key: ParamKey, value: number): string | null {
		const f = secondsPer(this.timeUnit);
		const err = (m: string) => {
			this.fieldErrors[key] = m;
			return m;
		};
		if (!Number.isFinite(value)) return err('Enter a number.');
		switch (key) {
			case 'kp':
				if (value === 0) return err('Kp must not be zero.');
				this.#commit('kp', value);
				break;
			case 'band': {
				const spans = this.spans;
				if (!spans) return err('The proportional band needs positive PV and MV spans on the model.');
				if (value === 0) return err('The proportional band must not be zero.');
				this.#commit('kp', gainFromProportionalBand(value, spans));
				break;
			}
			case 'ti':
				if (!(value * f >= 1e-6)) return err(`Ti must be greater than zero (at least 1 µs).`);
				this.#commit('ti', value * f);
				break;
			case 'td':
				if (value < 0) return err('Td must be zero or positive.');
				if (value > 0 && value * f < 1e-6) return err('Td must be 0 or at least 1 µs.');
				this.#commit('td', value * f);
				break;
			case 'ki':
				if (value === 0 || value * this.kp < 0) return err('Ki must be non-zero and have the same sign as Kp.');
				this.#commit('ki', value / f);
				break;
			case 'kd':
				if (value * this.kp < 0) return err('Kd must be zero or have the same sign as Kp.');
				this.#commit('kd', value * f);
				break;
			case 'n':
				if (!(value > 0)) return err('N must be greater than zero.');
				this.#commit('n', value);
				break;
			case 'b':
			case 'c':
				if (value < 0 || value > 1) return err(`${key} must be between 0 and 1.`);
				this.#commit(key, value);
				break;
		}
		delete this.fieldErrors[key];
		return null;
	}

	#commit(key: ScaleKey, value: number) {
		this[key] = value;
		if (key === 'kp' && this.fieldErrors.band) delete this.fieldErrors.band;
		if (key in this.scales) this.scales[key] = widenToInclude(this.scales[key], value);
		this.edited = true;
	}

	/** Changes the controller type; settings the new type needs keep their last values. */
	setType(type: ControllerType): void {
		if (!CONTROLLER_TYPES.includes(type) || type === this.type) return;
		this.type = type;
		this.edited = true;
		if (this.formNote?.kind === 'error') this.formNote = null;
	}

	/**
	 * Changes the form, converting the settings exactly (`convertController`). When the target
	 * form cannot represent them (series needs Ti ≥ 4·Td) nothing changes and `formNote` says why;
	 * returns false then.
	 */
	setForm(to: ControllerForm): boolean {
		if (!FORMS.includes(to) || to === this.form) return true;
		const from = this.form;
		const out = convertController(this.controller, to);
		if (!out.ok) {
			this.formNote = {
				kind: 'error',
				text: `Not converted: ${out.reason}${to === 'series' ? ' Raise Ti or lower Td first, or stay in the ideal form.' : ''}`
			};
			return false;
		}
		const oldKp = this.kp;
		const oldKi = this.ki;
		const oldKd = this.kd;
		const v = out.value;
		this.kp = v.kp;
		if (to === 'parallel') {
			this.ki = hasIntegral(this.type) && v.ki != null ? v.ki : this.kp / this.ti;
			this.kd = hasDerivative(this.type) && v.kd != null ? v.kd : this.kp * this.td;
		} else {
			if (hasIntegral(this.type) && v.ti != null) this.ti = v.ti;
			else if (from === 'parallel' && oldKi !== 0) this.ti = Math.abs(oldKp / oldKi);
			if (hasDerivative(this.type) && v.td != null) this.td = v.td;
			else if (from === 'parallel') this.td = Math.abs(oldKd / oldKp);
		}
		this.form = to;
		for (const k of ['kp', 'ti', 'td', 'ki', 'kd'] as const) this.scales[k] = widenToInclude(this.scales[k], Math.abs(this[k]));
		this.formNote = out.warnings.length ? { kind: 'info', text: out.warnings.join(' ') } : null;
		return true;
	}

	/** Switches between entering the gain and the proportional band (needs positive spans). */
	setGainMode(mode: 'gain' | 'band'): string | null {
		if (mode === 'band' && !this.spans) return 'The proportional band needs positive PV and MV spans on the model.';
		this.gainMode = mode;
		return null;
	}

	/**
	 * Loads settings given in any form (a rule's ideal settings, a design) into the bench,
	 * converted to `target` (default: the current form). When that form cannot represent them they
	 * load in the ideal form and `formNote` says so. Returns the form they were loaded in.
	 */
	loadSettings(settings: ControllerSettings, origin: SettingsOrigin, target: ControllerForm = this.form): ControllerForm {
		const withFilter: ControllerSettings = { ...settings, n: settings.n === undefined ? (this.filterOn ? this.n : null) : settings.n };
		let out = convertController(withFilter, target);
		// Settings already in the target form load exactly as given (no round trip through the ideal form).
		if (out.ok && (withFilter.form ?? 'ideal') === target) out = { ok: true, value: { ...withFilter, form: target }, warnings: [] };
		let note: FormNote | null = null;
		if (!out.ok) {
			const reason = out.reason;
			out = convertController(withFilter, 'ideal');
			if (!out.ok) {
				this.formNote = { kind: 'error', text: `Not loaded: ${out.reason}` };
				return this.form;
			}
			note = { kind: 'info', text: `Loaded in the ideal form: the ${target} form cannot represent these settings. ${reason}` };
		} else if (out.warnings.length) {
			note = { kind: 'info', text: out.warnings.join(' ') };
		}
		this.#applyRaw(out.value);
		this.origin = origin;
		this.edited = false;
		this.formNote = note;
		this.fieldErrors = {};
		return this.form;
	}

	#applyRaw(v: ControllerSettings) {
		this.type = v.type;
		this.form = v.form ?? 'ideal';
		this.kp = v.kp;
		if (this.form === 'parallel') {
			if (v.ki != null) this.ki = v.ki;
			if (v.kd != null) this.kd = v.kd;
			if (this.kp !== 0 && this.ki !== 0) this.ti = Math.abs(this.kp / this.ki);
			if (this.kp !== 0) this.td = Math.abs(this.kd / this.kp);
		} else {
			if (v.ti != null) this.ti = v.ti;
			if (v.td != null) this.td = v.td;
			this.ki = this.kp / this.ti;
			this.kd = this.kp * this.td;
		}
		if (hasDerivative(v.type)) {
			this.filterOn = v.n != null;
			if (v.n != null) this.n = v.n;
		}
		if (v.b != null) this.b = v.b;
		if (v.c != null) this.c = v.c;
		for (const k of ['kp', 'ti', 'td', 'ki', 'kd', 'n'] as const) this.scales[k] = widenToInclude(this.scales[k], Math.abs(this[k]));
	}

	/**
	 * Resets the bench to a saved tuning set (by id), in the form it was saved in (the controller
	 * on site); false when there is none with that id.
	 */
	loadSaved(id: number): boolean {
		const s = this.savedSets.find((x) => x.id === id);
		if (!s) return false;
		const settings = savedSetSettings(s);
		this.b = 1;
		this.c = 0;
		this.loadSettings(settings, { kind: 'saved', id: s.id, label: savedSetLabel(s), rule: s.rule, parameter: s.ruleParameter }, settings.form ?? 'ideal');
		return true;
	}

	/** The rule and its parameter to save with the settings: those of the origin unless edited by hand since. */
	get ruleForSave(): { rule: string | null; parameter: number | null } {
		if (this.edited) return { rule: null, parameter: null };
		if (this.origin.kind === 'rule') return { rule: this.origin.rule, parameter: this.origin.parameter };
		if (this.origin.kind === 'saved') return { rule: this.origin.rule, parameter: this.origin.parameter };
		return { rule: null, parameter: null };
	}

	/**
	 * The save form's fields (strings, as the form posts them): settings in the current form with
	 * times in the display unit; the parallel form is sent as Kp with Ti = Kp/Ki and Td = Kd/Kp
	 * (the tuning-set schema's convention).
	 */
	saveFields(predicted: Record<string, number | null> | null): Record<string, string> {
		const f = secondsPer(this.timeUnit);
		const c = this.controller;
		const out: Record<string, string> = {
			controllerType: c.type,
			form: c.form ?? 'ideal',
			timeUnit: this.timeUnit,
			kp: String(c.kp)
		};
		if (hasIntegral(c.type)) out.ti = String((c.form === 'parallel' ? c.kp / (c.ki as number) : (c.ti as number)) / f);
		if (hasDerivative(c.type)) {
			out.td = String((c.form === 'parallel' ? (c.kd as number) / c.kp : (c.td as number)) / f);
			if (c.n != null) out.filterN = String(c.n);
		}
		out.weightB = String(this.b);
		out.weightC = String(this.c);
		const r = this.ruleForSave;
		if (r.rule) out.rule = r.rule;
		if (r.parameter != null) out.ruleParameter = String(r.parameter);
		if (predicted) out.predicted = JSON.stringify(predicted);
		return out;
	}

	// ---- steps, robustness, comparison --------------------------------------------------------

	/** Sets the set-point or load step size (non-zero number). */
	setStep(which: 'spStep' | 'loadStep', value: number): string | null {
		if (!Number.isFinite(value) || value === 0) {
			this.fieldErrors[which] = 'Enter a non-zero number.';
			return this.fieldErrors[which] as string;
		}
		this[which] = value;
		delete this.fieldErrors[which];
		return null;
	}

	/** Sets an uncertainty range in percent (gain and time constants 0–99 %, dead time 0–1000 %). */
	setUncertainty(which: 'gainPercent' | 'delayPercent' | 'timeConstantPercent', value: number): string | null {
		const max = which === 'delayPercent' ? 1000 : 99;
		if (!(Number.isFinite(value) && value >= 0 && value <= max)) {
			const m = `Enter a percentage from 0 to ${max}.`;
			this.fieldErrors.robust = m;
			return m;
		}
		this.robust[which] = value;
		delete this.fieldErrors.robust;
		return null;
	}

	/** Adds the current settings to the comparison ("pin current"); error message when four are shown. */
	pinCurrent(): string | null {
		if (this.compare.length >= MAX_COMPARE) return this.#compareFull();
		this.#pinCounter++;
		const settings = $state.snapshot(this.controller) as ControllerSettings;
		this.compare.push({ key: `pin-${this.#pinCounter}`, label: `Pinned ${this.#pinCounter}: ${settingsSummary(settings, this.timeUnit)}`, settings });
		delete this.fieldErrors.compare;
		return null;
	}

	/** Adds a saved tuning set to the comparison; error message when four are shown or it is there already. */
	compareSaved(id: number): string | null {
		const s = this.savedSets.find((x) => x.id === id);
		if (!s) return 'There is no saved tuning set with this id.';
		const key = `saved-${id}`;
		if (this.compare.some((x) => x.key === key)) return 'This tuning set is on the plot already.';
		if (this.compare.length >= MAX_COMPARE) return this.#compareFull();
		this.compare.push({ key, label: savedSetLabel(s), settings: savedSetSettings(s) });
		delete this.fieldErrors.compare;
		return null;
	}

	#compareFull(): string {
		const m = `At most ${MAX_COMPARE} tuning sets can be compared; remove one first.`;
		this.fieldErrors.compare = m;
		return m;
	}

	/** Removes a comparison set. */
	removeCompare(key: string): void {
		this.compare = this.compare.filter((x) => x.key !== key);
		delete this.fieldErrors.compare;
	}
}
