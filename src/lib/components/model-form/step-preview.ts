/**
 * The open-loop step response of a model as typed into the model form: the plant alone, MV
 * stepped by one unit at t = 0, PV deviation from the operating point. Pure (no DOM); the engine's
 * realisation and matrix exponential do the work, so the preview matches what the bench computes.
 *
 * y(t) = 0 for t < θ, and for t ≥ θ the delay-free step response at τ = t − θ:
 *   x(τ) = ∫₀^τ e^(As)·B ds,  y = C·x(τ) + D
 * evaluated exactly between samples by the augmented exponential
 *   exp([[A, B], [0, 0]]·Δ) = [[Φ(Δ), Γ(Δ)], [0, 1]],  x(τ + Δ) = Φ(Δ)·x(τ) + Γ(Δ)
 * (Van Loan, "Computing integrals involving the matrix exponential", IEEE Trans. Autom. Control
 * 23 (1978) 395–404), so the dead time is exact, never a Padé approximation.
 */
import { expm, zeros } from '../../control/linalg';
import { realize } from '../../control/simulation';
import { roots } from '../../control/roots';
import { polyTrim } from '../../control/polynomial';
import { revisionSchema, type RevisionInput, type TimeUnitValue } from '../../schemas/revision';
import { secondsPer, toStoredModel } from '../../workflow/model-values';

/** A plant num/den·e^(−delay·s) with s in 1/s and the delay in seconds. */
export interface PreviewPlant {
	num: number[];
	den: number[];
	delaySeconds: number;
}

/**
 * The unit-step response of `plant` (MV step of 1 at t = 0) at the given times in seconds
 * (ascending, ≥ 0), exact up to rounding (see the module comment). Throws for an improper plant.
 */
export function openLoopStepAt(plant: PreviewPlant, times: readonly number[]): Float64Array {
	const ss = realize(plant.num, plant.den);
	const n = ss.n;
	const out = new Float64Array(times.length);
	const x = new Float64Array(n);
	const next = new Float64Array(n);
	let tauPrev = 0;
	let cachedDelta = Number.NaN;
	let phi = new Float64Array(0);
	let gamma = new Float64Array(0);
	for (let k = 0; k < times.length; k++) {
		const tau = times[k] - plant.delaySeconds;
		if (!(tau >= 0)) {
			out[k] = 0;
			continue;
		}
		const delta = tau - tauPrev;
		if (n > 0 && delta > 0) {
			// Uniform grids reuse one exponential; a relative tolerance keeps float noise from missing it.
			if (!(Math.abs(delta - cachedDelta) <= 1e-12 * Math.max(delta, cachedDelta))) {
				const m = zeros(n + 1, n + 1);
				for (let i = 0; i < n; i++) {
					for (let j = 0; j < n; j++) m.data[i * (n + 1) + j] = ss.a[i * n + j] * delta;
					m.data[i * (n + 1) + n] = ss.b[i] * delta;
				}
				const e = expm(m);
				phi = new Float64Array(n * n);
				gamma = new Float64Array(n);
				for (let i = 0; i < n; i++) {
					for (let j = 0; j < n; j++) phi[i * n + j] = e.data[i * (n + 1) + j];
					gamma[i] = e.data[i * (n + 1) + n];
				}
				cachedDelta = delta;
			}
			for (let i = 0; i < n; i++) {
				let s = gamma[i];
				for (let j = 0; j < n; j++) s += phi[i * n + j] * x[j];
				next[i] = s;
			}
			x.set(next);
		}
		tauPrev = Math.max(tauPrev, tau);
		let y = ss.d;
		for (let i = 0; i < n; i++) y += ss.c[i] * x[i];
		out[k] = y;
	}
	return out;
}

/** The preview as the chart draws it. */
export interface StepPreview {
	/** Times in the model's display unit (s or min), ascending, starting at 0. */
	t: Float64Array;
	/** PV change per unit MV step, in PV units. */
	y: Float64Array;
	timeUnit: TimeUnitValue;
	/** Final value (the static gain) of a stable plant; null for integrating or unstable ones, with the reason. */
	finalValue: number | null;
	finalReason: string | null;
	/** The plant has a pole at s = 0 (the response ramps). */
	integrating: boolean;
	/** The plant has a pole in the right half-plane (the response grows without bound). */
	unstable: boolean;
	/** Dead time in the display unit. */
	delay: number;
}

/** Samples of the preview after the dead time. */
export const PREVIEW_POINTS = 241;
/** Longest preview horizon in seconds (a year), whatever the poles say. */
const MAX_HORIZON_S = 3.2e7;

/**
 * The horizon of the preview in seconds: the dead time plus six times the slowest stable time
 * constant 1/|Re p| (a first-order response is within 0.25 % of its final value after 6τ, since
 * e^−6 ≈ 0.0025 — common practice); for unstable plants four growth times 1/Re p; for a pure
 * integrator ten dead times (or ten seconds without dead time).
 */
export function previewHorizonSeconds(plant: PreviewPlant): number {
	const den = polyTrim(plant.den);
	const poles = den.length > 1 ? roots(den) : [];
	const zeroTol = 1e-9 * Math.max(1, ...poles.map((p) => Math.hypot(p.re, p.im)));
	let slowestStable = 0;
	let fastestUnstable = 0;
	for (const p of poles) {
		if (p.re < -zeroTol) slowestStable = Math.max(slowestStable, -1 / p.re);
		else if (p.re > zeroTol) fastestUnstable = Math.max(fastestUnstable, 1 / p.re);
	}
	const theta = Math.max(0, plant.delaySeconds);
	let span: number;
	if (fastestUnstable > 0) span = 4 * fastestUnstable;
	else if (slowestStable > 0) span = 6 * slowestStable;
	else span = theta > 0 ? 9 * theta : 10;
	return Math.min(MAX_HORIZON_S, theta + span);
}

/**
 * The preview of a plant, sampled on [0, horizon] (plus the exact corner at the dead time), with
 * times converted to `timeUnit` for display. The static gain comes from den(0) ≠ 0 as num(0)/den(0)
 * (final-value theorem; e.g. Ogata, Modern Control Engineering, 5th ed., 2010, §5-8); when den(0)
 * is 0 the plant integrates and has no final value.
 */
export function stepPreview(plant: PreviewPlant, timeUnit: TimeUnitValue): StepPreview {
	const den = polyTrim(plant.den);
	const num = polyTrim(plant.num);
	const poles = den.length > 1 ? roots(den) : [];
	const zeroTol = 1e-9 * Math.max(1, ...poles.map((p) => Math.hypot(p.re, p.im)));
	const integrating = den.length > 1 && den[den.length - 1] === 0;
	const unstable = poles.some((p) => p.re > zeroTol);
	const horizon = previewHorizonSeconds(plant);
	const theta = Math.max(0, plant.delaySeconds);
	const times: number[] = [0];
	if (theta > 0) times.push(theta);
	const step = (horizon - theta) / (PREVIEW_POINTS - 1);
	for (let k = 1; k < PREVIEW_POINTS; k++) times.push(theta + k * step);
	let y = openLoopStepAt(plant, times);
	if (theta > 0 && y[1] !== 0) {
		// A biproper plant jumps at the dead time: draw the corner (θ, 0) before (θ, D).
		times.splice(1, 0, theta);
		const withCorner = new Float64Array(y.length + 1);
		withCorner[0] = 0;
		withCorner[1] = 0;
		withCorner.set(y.subarray(1), 2);
		y = withCorner;
	}
	const f = secondsPer(timeUnit);
	const t = Float64Array.from(times, (s) => s / f);
	let finalValue: number | null = null;
	let finalReason: string | null = null;
	if (integrating) finalReason = 'The model integrates (a pole at s = 0): the PV keeps ramping after a step.';
	else if (unstable) finalReason = 'The model is unstable (a pole in the right half-plane): the PV grows without bound.';
	else {
		const g = (num[num.length - 1] ?? 0) / den[den.length - 1];
		if (Number.isFinite(g)) finalValue = g;
		else finalReason = 'The static gain is not a finite number.';
	}
	return { t, y, timeUnit, finalValue, finalReason, integrating, unstable, delay: theta / f };
}

/** Placeholders for the fields the preview does not need, so the schema judges the dynamics alone. */
const NON_DYNAMIC = {
	mvName: 'MV',
	mvUnit: 'u',
	mvMin: '0',
	mvMax: '1',
	pvName: 'PV',
	pvUnit: 'u',
	pvMin: '0',
	pvMax: '1',
	opMv: '',
	opPv: '',
	opNote: '',
	method: 'step_test',
	testDate: '',
	fitR2: '',
	fitRmse: '',
	validRange: '',
	revalidateBy: '',
	changeSummary: 'preview',
	dataAttachmentId: ''
} as const;

/** What the form shows in place of the chart when the dynamics are not complete yet. */
export interface PreviewUnavailable {
	ok: false;
	/** Plain words: which fields to fill in or fix. */
	reason: string;
}

/**
 * The preview of the dynamics typed into the form (structure, parameters, time unit), checked
 * with the shared revision schema; `{ ok: false, reason }` naming the fields to fix while they are
 * missing or invalid. Other fields of the form do not matter here.
 */
export function previewFromForm(values: Record<string, unknown>): ({ ok: true } & StepPreview & { plant: PreviewPlant }) | PreviewUnavailable {
	const parsed = revisionSchema().safeParse({ ...values, ...NON_DYNAMIC });
	if (!parsed.success) {
		const labels = [...new Set(parsed.error.issues.map((i) => i.message.split(/[:.]/)[0].replace(/ must.*$/, '').trim()))];
		return { ok: false, reason: `Fill in or correct ${labels.slice(0, 3).join(', ')}${labels.length > 3 ? ' …' : ''} to see the response.` };
	}
	const input: RevisionInput = parsed.data;
	const stored = toStoredModel(input);
	const plant: PreviewPlant = { num: stored.num, den: stored.den, delaySeconds: stored.delaySeconds };
	try {
		return { ok: true, plant, ...stepPreview(plant, input.timeUnit) };
	} catch (e) {
		return { ok: false, reason: e instanceof Error ? e.message : 'The model cannot be simulated.' };
	}
}
