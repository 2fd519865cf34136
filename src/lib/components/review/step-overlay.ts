/**
 * The two open-loop step responses of a revision comparison, for drawing them on one chart: the
 * PV change after a unit step of the MV at t = 0 with no controller, y(t) = L⁻¹{G(s)e^(−θs)/s},
 * for the older and the newer revision on one common time grid. Computed with the engine's loop
 * simulation (`simulateLoop`, exact dead time by a delay line) with every controller term zero:
 * the loop is then open and its load-step response at the plant input IS the plant's step
 * response. Pure; runs on the server and in the browser.
 */
import { simulateLoop } from '$lib/control/simulation';
import type { ControllerTerms } from '$lib/control/controller';
import { roots } from '$lib/control/roots';
import type { TransferFunction } from '$lib/control/types';

/** Open-loop step responses of two plants on one grid. Times in seconds; y in PV units per MV unit. */
export interface StepOverlay {
	t: number[];
	/** Older revision; null where the response is not available (diverged beyond the plot). */
	from: (number | null)[];
	/** Newer revision. */
	to: (number | null)[];
	tEndSeconds: number;
	/** Why a response is incomplete, in plain words (empty when both are complete). */
	notes: string[];
}

/** Multiples of the slowest time constant shown after the dead time: 5τ reaches 99.3 % of a first-order step (1 − e⁻⁵; common practice). */
export const SETTLING_MULTIPLE = 5;
/** Horizon for a plant with only integrating poles: this many dead times, at least `MIN_HORIZON_SECONDS`. */
export const INTEGRATING_DEAD_TIMES = 10;
/** Shortest horizon drawn, s. */
export const MIN_HORIZON_SECONDS = 10;
/** Longest horizon drawn, s (30 days; slower models are out of scale for a step plot). */
export const MAX_HORIZON_SECONDS = 30 * 86_400;

/** No controller at all: p = i = d = 0. */
const OPEN: ControllerTerms = { p: 0, i: 0, d: 0, tf: 0, b: 1, c: 0 };

/**
 * How long one plant's step response takes to show its shape, s: θ + 5·τslow, with τslow = 1/|Re p|
 * of the slowest pole off the origin (for a pure integrator: 10·θ). Never below 10 s.
 */
export function stepHorizonSeconds(plant: TransferFunction): number {
	const poles = roots(plant.den);
	const scale = Math.max(...plant.den.map((c) => Math.abs(c)), 1e-300);
	let slowest = 0;
	for (const p of poles) {
		const magnitude = Math.hypot(p.re, p.im);
		// Poles at the origin (within rounding) are integrators, not time constants.
		if (magnitude <= 1e-12 * (1 + scale) || Math.abs(p.re) < 1e-12) continue;
		slowest = Math.max(slowest, 1 / Math.abs(p.re));
	}
	const delay = Math.max(0, plant.delay);
	const horizon = slowest > 0 ? delay + SETTLING_MULTIPLE * slowest : INTEGRATING_DEAD_TIMES * delay;
	return Math.min(MAX_HORIZON_SECONDS, Math.max(MIN_HORIZON_SECONDS, horizon));
}

function response(plant: TransferFunction, tEnd: number, points: number, label: string, notes: string[]): { t: Float64Array | null; y: (number | null)[] } {
	try {
		const sim = simulateLoop(plant, OPEN, { tEnd, points });
		const y = Array.from({ length: points }, (_, i) => {
			const v = i < sim.t.length ? sim.disturbance.y[i] : NaN;
			return Number.isFinite(v) ? v : null;
		});
		if (sim.truncatedAt !== null) notes.push(`The ${label} response grows without bound and is cut at ${sim.truncatedAt.toPrecision(3)} s.`);
		for (const n of sim.notes) notes.push(`${label[0].toUpperCase()}${label.slice(1)}: ${n}`);
		return { t: sim.t, y };
	} catch (e) {
		notes.push(`The ${label} response cannot be computed: ${e instanceof Error ? e.message : String(e)}`);
		return { t: null, y: new Array<number | null>(points).fill(null) };
	}
}

/**
 * Open-loop unit step responses of `from` and `to` on one grid of `points` samples over [0, tEnd]
 * (default tEnd: the longer of the two `stepHorizonSeconds`). Values that are not finite are null.
 */
export function stepOverlay(from: TransferFunction, to: TransferFunction, options: { tEndSeconds?: number; points?: number } = {}): StepOverlay {
	const points = Math.max(2, Math.floor(options.points ?? 400));
	const tEnd = options.tEndSeconds ?? Math.max(stepHorizonSeconds(from), stepHorizonSeconds(to));
	const notes: string[] = [];
	const a = response(from, tEnd, points, 'older revision', notes);
	const b = response(to, tEnd, points, 'newer revision', notes);
	const dt = tEnd / (points - 1);
	const t = Array.from({ length: points }, (_, i) => i * dt);
	return { t, from: a.y, to: b.y, tEndSeconds: tEnd, notes };
}
