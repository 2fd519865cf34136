/**
 * One complete analysis of a plant + controller loop (closed loop, time responses, metrics,
 * frequency response and margins), shared by `analyze`, the robustness envelope and the
 * benchmark. Units: seconds, rad/s, degrees.
 */
import type { Complex, TransferFunction } from './types';
import type { ControllerTerms } from './controller';
import { analyzeClosedLoop, DEFAULT_PADE_ORDER, errorConstants, steadyStateErrors, type ClosedLoopReport, type ErrorConstants, type SteadyStateErrors } from './closed-loop';
import { analysisGrid, bode, evaluateLoop, frequencyRange, logspace, loopModelFromFactors, stabilityMargins, type BodeData, type Margins } from './frequency';
import { controllerPolynomials } from './controller';
import { roots, sortRoots } from './roots';
import { disturbanceMetrics, stepMetrics, type DisturbanceMetrics, type StepMetrics } from './metrics';
import { simulateLoop, type SimulationResult } from './simulation';
import { modulus } from './complex';

/** Numerical options of one analysis (all optional; defaults documented on each). */
export interface LoopAnalysisOptions {
	/** Final time of the time responses in seconds; default from `defaultEndTime`. */
	tEnd?: number;
	/** Samples of the time responses (default 2000). */
	points?: number;
	/** Settling band as a fraction of |final value| (default 0.02). */
	settlingBand?: number;
	/** Order of the Padé approximant for closed-loop poles of delayed loops (default 5). */
	padeOrder?: number;
	/** Points of the Bode grid (default 400). */
	bodePoints?: number;
	/** Skip the Bode arrays (margins are still computed). */
	skipBode?: boolean;
}

/** Everything one analysis computes, as typed arrays and nullable numbers. */
export interface LoopAnalysis {
	closedLoop: ClosedLoopReport;
	tEnd: number;
	simulation: SimulationResult;
	step: StepMetrics;
	stepReasons: Record<string, string>;
	disturbance: DisturbanceMetrics;
	disturbanceReasons: Record<string, string>;
	margins: Margins;
	bode: BodeData | null;
	errorConstants: ErrorConstants;
	steadyState: SteadyStateErrors | null;
	warnings: string[];
}

/**
 * Default final time (seconds) from the closed-loop poles (Padé-approximated for dead time):
 * stable: θ + 8/σmin, σmin the slowest decay rate min(−Re p) (e^(−8) ≈ 3e-4 of a mode is left);
 * unstable: θ + 6/max Re p (growth by e^6), or six periods of an undamped oscillation; clamped to
 * [1e-6, 1e9] s. Without poles (static loop) θ + 1 s.
 */
export function defaultEndTime(poles: readonly Complex[], delay: number, stable: boolean): number {
	let slow = Infinity;
	let growth = 0;
	let axisFreq = 0;
	for (const p of poles) {
		const mag = modulus(p.re, p.im);
		const tol = 1e-10 * mag;
		if (p.re < -tol) slow = Math.min(slow, -p.re);
		else if (p.re > tol) growth = Math.max(growth, p.re);
		else axisFreq = Math.max(axisFreq, Math.abs(p.im));
	}
	let t: number;
	if (stable) t = Number.isFinite(slow) ? delay + 8 / slow : delay + 1;
	else if (growth > 0) t = delay + 6 / growth;
	else if (axisFreq > 0) t = delay + (6 * 2 * Math.PI) / axisFreq;
	else t = Number.isFinite(slow) ? delay + 8 / slow : delay + 10;
	if (!Number.isFinite(t) || t <= 0) t = 1;
	return Math.min(1e9, Math.max(1e-6, t));
}

/** Closed-loop DC gain num(0)/den(0), or null when the denominator vanishes at 0. */
function dcRatio(num: readonly number[], den: readonly number[]): number | null {
	const d0 = den[den.length - 1];
	const n0 = num.length ? num[num.length - 1] : 0;
	if (!d0) return null;
	return n0 / d0;
}

/**
 * Full analysis of plant G (proper, delay ≥ 0) with controller terms. Throws AnalysisInputError
 * for ill-posed or improper loops (see `analyzeClosedLoop`).
 */
export function analyzeLoop(plant: TransferFunction, terms: ControllerTerms, opts: LoopAnalysisOptions = {}): LoopAnalysis {
	const padeOrder = opts.padeOrder ?? DEFAULT_PADE_ORDER;
	const points = opts.points ?? 2000;
	const band = opts.settlingBand ?? 0.02;
	const cl = analyzeClosedLoop(plant, terms, padeOrder);
	const warnings = [...cl.warnings];
	const tEnd = opts.tEnd ?? defaultEndTime(cl.poles, plant.delay, cl.stable);
	const finalSp = dcRatio(cl.exact.ry, cl.exact.char);
	const finalD = dcRatio(cl.exact.dy, cl.exact.char);
	const refScale = Math.max(1, Math.abs(finalSp ?? 0), Math.abs(finalD ?? 0));
	const plantPoles = roots(plant.den);
	const sim = simulateLoop(plant, terms, { tEnd, points, limit: 1e6 * refScale, plantPoles });
	warnings.push(...sim.notes);
	if (sim.truncatedAt !== null) warnings.push(`The response grows without bound; the time series stop at t = ${sim.truncatedAt.toPrecision(4)} s.`);
	if (sim.mvImpulse) warnings.push('The MV contains an impulse at the set-point step (ideal derivative on the set-point, c ≠ 0); the sampled MV omits it.');

	const stepReasons: Record<string, string> = {};
	const disturbanceReasons: Record<string, string> = {};
	const nullStep: StepMetrics = {
		riseTime: null,
		peak: null,
		peakTime: null,
		overshootPercent: null,
		undershootPercent: null,
		settlingTime: null,
		finalValue: null,
		steadyStateError: null,
		iae: null,
		ise: null,
		itae: null,
		peakMv: null,
		peakMvTime: null
	};
	const nullDist: DisturbanceMetrics = { finalValue: null, peak: null, peakTime: null, recoveryTime: null, iae: null, ise: null, itae: null, peakMv: null, peakMvTime: null };
	let step = nullStep;
	let dist = nullDist;
	let steadyState: SteadyStateErrors | null = null;
	if (cl.stable && finalSp !== null && finalD !== null) {
		const f = sim.fine;
		const s = stepMetrics({ t: f.t, y: f.setpoint.y, dy: f.setpoint.dy, u: f.setpoint.u }, finalSp, band, 1, sim.mvImpulse);
		step = s.metrics;
		Object.assign(stepReasons, s.reasons);
		const d = disturbanceMetrics({ t: f.t, y: f.disturbance.y, dy: f.disturbance.dy, u: f.disturbance.u }, finalD, band);
		dist = d.metrics;
		Object.assign(disturbanceReasons, d.reasons);
		steadyState = steadyStateErrors(cl.exact.char, cl.exact.ry);
	} else {
		const why = `The closed loop is unstable (${cl.instability ?? 'poles not in the open left half-plane'}); the final value theorem does not apply and step metrics are undefined.`;
		for (const k of Object.keys(nullStep)) stepReasons[k] = why;
		for (const k of Object.keys(nullDist)) disturbanceReasons[k] = why;
	}

	const { nc, dc } = controllerPolynomials(terms);
	const plantZeros = roots(plant.num);
	const model = loopModelFromFactors(
		(nc[0] * plant.num[0]) / (dc[0] * plant.den[0]),
		sortRoots([...roots(nc), ...plantZeros]),
		sortRoots([...roots(dc), ...plantPoles]),
		plant.delay
	);
	const range = frequencyRange(model);
	const display = logspace(range.wMin, range.wMax, opts.bodePoints ?? 400);
	const grid = analysisGrid(model, display);
	const values = evaluateLoop(model, grid);
	const margins = stabilityMargins(model, grid, values);
	if (!cl.stable && margins.ms !== null) {
		margins.ms = null;
		margins.msFrequency = null;
		margins.reasons.ms = 'The closed loop is unstable, so the peak of |S(jω)| is not a robustness measure.';
		margins.reasons.msFrequency = margins.reasons.ms;
	}
	const openRhp = model.poles.filter((p) => p.re > 1e-10 * modulus(p.re, p.im)).length;
	if (openRhp > 0) warnings.push(`The open loop has ${openRhp} pole(s) in the right half-plane: gain and phase margins are not a stability test here (use the Nyquist criterion).`);
	return {
		closedLoop: cl,
		tEnd,
		simulation: sim,
		step,
		stepReasons,
		disturbance: dist,
		disturbanceReasons,
		margins,
		bode: opts.skipBode ? null : grid === display ? bode(model, display, values) : bode(model, display),
		errorConstants: errorConstants(cl.exact.loopNum, cl.exact.loopDen),
		steadyState,
		warnings
	};
}
