/**
 * Robustness envelope: the same controller re-analysed over a grid of plant perturbations
 * (gain ± x %, dead time + y %, time constants ± z %), returning the min/max PV over time and the
 * min/max of each metric. Seconds, rad/s, degrees.
 */
import type { ControllerSettings } from './types';
import { controllerTerms } from './controller';
import { AnalysisInputError } from './errors';
import { analyzeLoop, type LoopAnalysisOptions } from './loop-analysis';
import { perturbPlant, plantTransferFunction, type PlantStructure } from './plants';

/** Uncertainty ranges in percent and the number of levels per factor (including the extremes). */
export interface UncertaintySpec {
	/** Gain varies over ±gainPercent % (default 0). */
	gainPercent?: number;
	/** Dead time varies over 0 … +delayPercent % (default 0). */
	delayPercent?: number;
	/** Time constants vary over ±timeConstantPercent % (default 0). */
	timeConstantPercent?: number;
	/** Levels per varied factor, ≥ 2 (default 3 for gain and time constants, 2 for dead time). */
	gainLevels?: number;
	delayLevels?: number;
	timeConstantLevels?: number;
}

/** Min and max of one metric over the stable cases, and how many cases had no value. */
export interface MetricRange {
	min: number | null;
	max: number | null;
	missing: number;
}

/** Result of `robustnessEnvelope`. */
export interface RobustnessEnvelope {
	cases: number;
	unstableCases: number;
	/** Perturbation factors of the unstable cases. */
	unstable: { gainFactor: number; delayFactor: number; timeConstantFactor: number }[];
	/** Common time grid (s) and the PV envelope over the stable cases. */
	t: number[];
	yMin: number[];
	yMax: number[];
	metrics: Record<'riseTime' | 'overshootPercent' | 'settlingTime' | 'iae' | 'peakMv' | 'gainMargin' | 'phaseMargin' | 'ms', MetricRange>;
	factors: { gain: number[]; delay: number[]; timeConstant: number[] };
}

function levels(percent: number, count: number, oneSided: boolean): number[] {
	if (percent === 0) return [1];
	const n = Math.max(2, Math.floor(count));
	const lo = oneSided ? 1 : 1 - percent / 100;
	const hi = 1 + percent / 100;
	return Array.from({ length: n }, (_, i) => lo + ((hi - lo) * i) / (n - 1));
}

function checkPercent(v: unknown, field: string, max: number): number {
	if (v === undefined || v === null) return 0;
	if (typeof v !== 'number' || !Number.isFinite(v) || v < 0 || v > max) throw new AnalysisInputError(field, `Must be a number between 0 and ${max} (percent).`);
	return v;
}

/**
 * Robustness envelope over the full factorial grid of gain, dead-time and time-constant levels
 * (the nominal plant is always included via the grid's tEnd). All cases share the nominal
 * time grid (tEnd from the nominal loop unless given). Metrics use `analyzeLoop`.
 */
export function robustnessEnvelope(plant: PlantStructure, controller: ControllerSettings, spec: UncertaintySpec, options: LoopAnalysisOptions = {}): RobustnessEnvelope {
	const gp = checkPercent(spec.gainPercent, 'uncertainty.gainPercent', 99);
	const dp = checkPercent(spec.delayPercent, 'uncertainty.delayPercent', 1000);
	const tp = checkPercent(spec.timeConstantPercent, 'uncertainty.timeConstantPercent', 99);
	const gains = levels(gp, spec.gainLevels ?? 3, false);
	const delays = levels(dp, spec.delayLevels ?? 2, true);
	const taus = levels(tp, spec.timeConstantLevels ?? 3, false);
	if (gains.length * delays.length * taus.length > 400) throw new AnalysisInputError('uncertainty', 'At most 400 cases (levels multiplied) are allowed.');
	const terms = controllerTerms(controller);
	const nominal = analyzeLoop(plantTransferFunction(plant), terms, { ...options, skipBode: true });
	const tEnd = options.tEnd ?? nominal.tEnd;
	const opts: LoopAnalysisOptions = { ...options, tEnd, skipBode: true };
	const keys = ['riseTime', 'overshootPercent', 'settlingTime', 'iae', 'peakMv', 'gainMargin', 'phaseMargin', 'ms'] as const;
	const metrics = Object.fromEntries(keys.map((k) => [k, { min: null, max: null, missing: 0 } as MetricRange])) as RobustnessEnvelope['metrics'];
	const t = Array.from(nominal.simulation.t);
	const yMin = new Array<number>(t.length).fill(Infinity);
	const yMax = new Array<number>(t.length).fill(-Infinity);
	const unstable: RobustnessEnvelope['unstable'] = [];
	let cases = 0;
	for (const g of gains)
		for (const d of delays)
			for (const tc of taus) {
				cases++;
				const p = perturbPlant(plant, { gainFactor: g, delayFactor: d, timeConstantFactor: tc });
				const a = analyzeLoop(plantTransferFunction(p), terms, opts);
				if (!a.closedLoop.stable) {
					unstable.push({ gainFactor: g, delayFactor: d, timeConstantFactor: tc });
					for (const k of keys) metrics[k].missing++;
					continue;
				}
				const ys = a.simulation.setpoint.y;
				for (let i = 0; i < Math.min(ys.length, t.length); i++) {
					if (ys[i] < yMin[i]) yMin[i] = ys[i];
					if (ys[i] > yMax[i]) yMax[i] = ys[i];
				}
				const values: Record<(typeof keys)[number], number | null> = {
					riseTime: a.step.riseTime,
					overshootPercent: a.step.overshootPercent,
					settlingTime: a.step.settlingTime,
					iae: a.step.iae,
					peakMv: a.step.peakMv,
					gainMargin: a.margins.gainMargin,
					phaseMargin: a.margins.phaseMargin,
					ms: a.margins.ms
				};
				for (const k of keys) {
					const v = values[k];
					const r = metrics[k];
					if (v === null || !Number.isFinite(v)) {
						r.missing++;
						continue;
					}
					r.min = r.min === null ? v : Math.min(r.min, v);
					r.max = r.max === null ? v : Math.max(r.max, v);
				}
			}
	// Samples no stable case reached stay at the nominal value range guard: use the nominal PV.
	const nomY = nominal.simulation.setpoint.y;
	for (let i = 0; i < t.length; i++) {
		if (!Number.isFinite(yMin[i])) yMin[i] = nomY[i];
		if (!Number.isFinite(yMax[i])) yMax[i] = nomY[i];
	}
	return { cases, unstableCases: unstable.length, unstable, t, yMin, yMax, metrics, factors: { gain: gains, delay: delays, timeConstant: taus } };
}
