/**
 * `analyze(request)`: the analysis contract of PRODUCT.md ("Analysis API contract"), shared by
 * POST /api/v1/analysis and the bench. Seconds, rad/s, degrees. The response never contains NaN
 * or Infinity: a value that does not exist is null, with its reason in `reasons` (keyed by the
 * dotted response path).
 */
import type { Complex, ControllerSettings } from './types';
import { controllerTerms } from './controller';
import { AnalysisInputError } from './errors';
import { analyzeLoop } from './loop-analysis';
import { recognisePlant, type PlantStructure } from './plants';
import { robustnessEnvelope, type RobustnessEnvelope, type UncertaintySpec } from './robustness';
import { sweepPoles, type SweepResult, type SweepSpec } from './sweep';
import { makeTransferFunction, tfIsProper } from './transfer-function';
import type { DisturbanceMetrics } from './metrics';
import type { GainCrossing, PhaseCrossing } from './frequency';

/** Request of `analyze` (PRODUCT.md contract plus the optional `uncertainty` and `sweep`). */
export interface AnalysisRequest {
	plant: { num: number[]; den: number[]; delay?: number };
	controller: ControllerSettings;
	options?: {
		tEnd?: number;
		points?: number;
		settlingBand?: number;
		padeOrder?: number;
		bodePoints?: number;
	};
	uncertainty?: UncertaintySpec;
	sweep?: SweepSpec;
}

/** Response of `analyze` (PRODUCT.md contract plus documented extras). */
export interface AnalysisResponse {
	closedLoop: {
		num: number[];
		den: number[];
		poles: Complex[];
		zeros: Complex[];
		stable: boolean;
		/** 'pade' when the dead time was replaced by its Padé approximant for poles/zeros/stability. */
		approximation: 'exact' | 'pade';
		padeOrder: number | null;
		routh: { rhpCount: number; zeroRow: boolean; agrees: boolean };
		instability: string | null;
	};
	/** Set-point test: time (s), PV, MV as Float64Array of finite samples (plain arrays in `analysisToJson`). */
	step: ResponseSeries;
	stepInfo: {
		riseTime: number | null;
		peak: number | null;
		peakTime: number | null;
		overshootPercent: number | null;
		undershootPercent: number | null;
		settlingTime: number | null;
		settlingBand: number;
		finalValue: number | null;
		steadyStateError: number | null;
		iae: number | null;
		ise: number | null;
		itae: number | null;
		peakMv: number | null;
		peakMvTime: number | null;
	};
	margins: {
		gainMargin: number | null;
		gainMarginDb: number | null;
		phaseCrossover: number | null;
		phaseMargin: number | null;
		gainCrossover: number | null;
		delayMargin: number | null;
		ms: number | null;
		msFrequency: number | null;
		phaseCrossings: PhaseCrossing[];
		gainCrossings: GainCrossing[];
	};
	dominant: { zeta: number; wn: number; wd: number } | null;
	/** Load test (unit step at the plant input): time, PV, MV as for `step`, and its metrics. */
	disturbance: ResponseSeries & { info: DisturbanceMetrics };
	bode: { w: number[]; magDb: number[]; phaseDeg: number[] };
	errorConstants: { systemType: number; kp: number | null; kv: number | null; ka: number | null };
	steadyState: { step: number | null; ramp: number | null; parabola: number | null };
	simulation: { tEnd: number; points: number; internalStep: number; substeps: number; method: string; truncatedAt: number | null };
	plantStructure: PlantStructure;
	robustness?: RobustnessEnvelope;
	sweep?: SweepResult;
	warnings: string[];
	reasons: Record<string, string>;
}

/** The time series of one test: time (s), PV, MV; equal lengths, finite samples. */
export interface ResponseSeries {
	t: Float64Array;
	y: Float64Array;
	u: Float64Array;
}

/** The response with its series as plain arrays: the JSON form of the API. */
export type AnalysisJson = Omit<AnalysisResponse, 'step' | 'disturbance'> & {
	step: { t: number[]; y: number[]; u: number[] };
	disturbance: { t: number[]; y: number[]; u: number[]; info: DisturbanceMetrics };
};

function plain(a: Float64Array): number[] {
	const out = new Array<number>(a.length);
	for (let i = 0; i < a.length; i++) out[i] = a[i];
	return out;
}

/**
 * The response as plain JSON data (`analyze` keeps its series in Float64Array: no copies on the
 * hot path, cheap to post to a worker; JSON.stringify needs arrays).
 */
export function analysisToJson(r: AnalysisResponse): AnalysisJson {
	const t = plain(r.step.t);
	const dt = r.disturbance.t === r.step.t ? t : plain(r.disturbance.t);
	return {
		...r,
		step: { t, y: plain(r.step.y), u: plain(r.step.u) },
		disturbance: { t: dt, y: plain(r.disturbance.y), u: plain(r.disturbance.u), info: r.disturbance.info }
	};
}

/**
 * The series of one test, checked: every PV and MV sample finite (the simulation cuts a diverging response
 * before it overflows). Should a non-finite sample ever appear, the three series are cut before
 * it and the cut is recorded (a safety net like `sanitize`).
 */
function checkedSeries(t: Float64Array, y: Float64Array, u: Float64Array, name: string, found: string[]): ResponseSeries {
	// The time grid is k·h with a finite step: only the PV and MV need the check.
	const n = t.length;
	for (let i = 0; i < n; i++) {
		const a = y[i];
		const b = u[i];
		if (a - a === 0 && b - b === 0) continue;
		found.push(`${name}[${i}]`);
		return { t: t.subarray(0, i), y: y.subarray(0, i), u: u.subarray(0, i) };
	}
	return { t, y, u };
}

/**
 * Analyses a plant num/den·e^(−delay·s) under a P/PI/PD/PID controller: closed loop (Padé for
 * poles and stability of delayed loops), set-point and load step responses with exact dead time,
 * step metrics, Bode data, margins, Ms, error constants; optionally the robustness envelope and
 * a pole sweep. Throws AnalysisInputError (with the request field) for invalid input; validate
 * with the zod schema in src/lib/schemas/analysis.ts first to get all structural errors.
 */
export function analyze(request: AnalysisRequest): AnalysisResponse {
	if (!request || typeof request !== 'object') throw new AnalysisInputError('', 'The request must be an object.');
	if (!request.plant || typeof request.plant !== 'object') throw new AnalysisInputError('plant', 'The plant is required.');
	const plant = makeTransferFunction(request.plant.num, request.plant.den, request.plant.delay ?? 0, 'plant');
	if (plant.num.length === 0) throw new AnalysisInputError('plant.num', 'The numerator is zero: the plant has no effect.');
	if (!tfIsProper(plant)) throw new AnalysisInputError('plant.num', 'The plant is improper (numerator degree above denominator degree).');
	if (plant.den.length - 1 > 20) throw new AnalysisInputError('plant.den', 'The plant order is above 20.');
	const terms = controllerTerms(request.controller, 'controller');
	const o = request.options ?? {};
	const band = o.settlingBand ?? 0.02;
	const a = analyzeLoop(plant, terms, {
		tEnd: o.tEnd,
		points: o.points ?? 2000,
		settlingBand: band,
		padeOrder: o.padeOrder,
		bodePoints: o.bodePoints ?? 400
	});
	const reasons: Record<string, string> = {};
	for (const [k, v] of Object.entries(a.stepReasons)) reasons[`stepInfo.${k}`] = v;
	for (const [k, v] of Object.entries(a.disturbanceReasons)) reasons[`disturbance.info.${k}`] = v;
	for (const [k, v] of Object.entries(a.margins.reasons)) reasons[`margins.${k}`] = v;
	const ec = a.errorConstants;
	if (ec.kp === null) reasons['errorConstants.kp'] = 'infinite: the loop has at least one free integrator (type ≥ 1)';
	if (ec.kv === null) reasons['errorConstants.kv'] = 'infinite: the loop is of type ≥ 2';
	if (ec.ka === null) reasons['errorConstants.ka'] = 'infinite: the loop is of type ≥ 3';
	const ss = a.steadyState ?? { step: null, ramp: null, parabola: null };
	for (const k of ['step', 'ramp', 'parabola'] as const) {
		if (ss[k] !== null) continue;
		reasons[`steadyState.${k}`] = a.steadyState ? `the error to a ${k} grows without bound (loop type too low)` : 'the closed loop is unstable: the final value theorem does not apply';
	}
	if (!a.closedLoop.dominant) reasons.dominant = 'The dominant (rightmost) closed-loop pole is real, or there are no poles.';
	const sim = a.simulation;
	const plantStructure = recognisePlant(plant);
	const found: string[] = [];
	// Both responses share one time grid (one array, never modified).
	const step = checkedSeries(sim.t, sim.setpoint.y, sim.setpoint.u, 'step', found);
	const load = checkedSeries(sim.t, sim.disturbance.y, sim.disturbance.u, 'disturbance', found);
	const response: AnalysisResponse = {
		closedLoop: {
			num: a.closedLoop.num,
			den: a.closedLoop.den,
			poles: a.closedLoop.poles,
			zeros: a.closedLoop.zeros,
			stable: a.closedLoop.stable,
			approximation: a.closedLoop.approximation,
			padeOrder: a.closedLoop.padeOrder,
			routh: a.closedLoop.routh,
			instability: a.closedLoop.instability
		},
		step,
		stepInfo: { ...a.step, settlingBand: band },
		margins: {
			gainMargin: a.margins.gainMargin,
			gainMarginDb: a.margins.gainMarginDb,
			phaseCrossover: a.margins.phaseCrossover,
			phaseMargin: a.margins.phaseMargin,
			gainCrossover: a.margins.gainCrossover,
			delayMargin: a.margins.delayMargin,
			ms: a.margins.ms,
			msFrequency: a.margins.msFrequency,
			phaseCrossings: a.margins.phaseCrossings,
			gainCrossings: a.margins.gainCrossings
		},
		dominant: a.closedLoop.dominant,
		disturbance: { ...load, info: a.disturbance },
		bode: a.bode ?? { w: [], magDb: [], phaseDeg: [] },
		errorConstants: ec,
		steadyState: ss,
		simulation: {
			tEnd: a.tEnd,
			points: sim.t.length,
			internalStep: sim.h,
			substeps: sim.substeps,
			method: sim.method,
			truncatedAt: sim.truncatedAt
		},
		plantStructure,
		warnings: a.warnings,
		reasons
	};
	if (request.uncertainty) {
		response.robustness = robustnessEnvelope(plantStructure, request.controller, request.uncertainty, {
			tEnd: a.tEnd,
			points: o.points ?? 2000,
			settlingBand: band,
			padeOrder: o.padeOrder
		});
	}
	if (request.sweep) response.sweep = sweepPoles(plant, request.controller, request.sweep, o.padeOrder);
	return sanitize(response, found);
}

/**
 * Replaces any non-finite number left anywhere in the response by null and records it, with
 * the cuts already made in the time series (a safety net: the engine is meant never to produce one;
 * the fuzz test checks that this note never appears).
 */
export function sanitize(r: AnalysisResponse, found: string[] = []): AnalysisResponse {
	// The path of a value is built only when one is bad: the keys down to it are kept on a stack.
	const stack: (string | number)[] = [];
	const pathOf = (last: string | number): string => {
		let p = '';
		for (const k of [...stack, last]) p += typeof k === 'number' ? `[${k}]` : p ? `.${k}` : k;
		return p;
	};
	const walk = (v: object): void => {
		// The time series were checked when they were taken (`checkedSeries`).
		if (ArrayBuffer.isView(v)) return;
		if (Array.isArray(v)) {
			// Numeric arrays (the Bode data) in one tight pass; the slow path only on a bad value.
			let i = 0;
			while (i < v.length && typeof v[i] === 'number' && v[i] - v[i] === 0) i++;
			if (i === v.length) return;
			for (; i < v.length; i++) {
				const x = v[i];
				if (typeof x === 'number') {
					if (!Number.isFinite(x)) {
						found.push(pathOf(i));
						v[i] = null;
					}
				} else if (x !== null && typeof x === 'object') {
					stack.push(i);
					walk(x);
					stack.pop();
				}
			}
			return;
		}
		const o = v as Record<string, unknown>;
		for (const k in o) {
			const x = o[k];
			if (typeof x === 'number') {
				if (!Number.isFinite(x)) {
					found.push(pathOf(k));
					o[k] = null;
				}
			} else if (x !== null && typeof x === 'object') {
				stack.push(k);
				walk(x);
				stack.pop();
			}
		}
	};
	walk(r);
	if (found.length) {
		r.warnings.push(`Internal: ${found.length} non-finite value(s) replaced by null or cut off (first at ${found[0]}).`);
		for (const p of found.slice(0, 20)) r.reasons[p] = 'not finite (numerical overflow)';
	}
	return r;
}
