/**
 * Step-response metrics located between samples: rise time 10–90 %, peak and peak time,
 * overshoot and undershoot, settling time (last exit from a ±band·|final| tube), IAE, ISE, ITAE;
 * peak MV (largest sample: the MV jumps at events); and the corresponding load-disturbance
 * measures. Events are found by cubic Hermite interpolation when dy/dt samples are exact (else
 * linear); integrals by the corrected trapezoidal rule (plain trapezoidal without derivatives).
 * Definitions follow PRODUCT.md and common practice (e.g. Ogata, Modern Control Engineering,
 * §5-3; python-control `step_info`, but interpolated instead of sample-bound). Nothing here
 * returns NaN or Infinity: a value that does not exist is null with a reason.
 */
import { brentMinimize, brentRoot } from './solvers';

/** A sampled response: times (s), PV and optional exact derivative, MV. */
export interface SampledResponse {
	t: ArrayLike<number>;
	y: ArrayLike<number>;
	dy?: ArrayLike<number> | null;
	u: ArrayLike<number>;
}

/** Set-point step metrics (seconds; percent; PV and MV units). Null when undefined (see reasons). */
export interface StepMetrics {
	riseTime: number | null;
	peak: number | null;
	peakTime: number | null;
	overshootPercent: number | null;
	undershootPercent: number | null;
	settlingTime: number | null;
	finalValue: number | null;
	steadyStateError: number | null;
	iae: number | null;
	ise: number | null;
	itae: number | null;
	peakMv: number | null;
	peakMvTime: number | null;
}

/** Load-disturbance step metrics (PV deviation; seconds; MV units). */
export interface DisturbanceMetrics {
	finalValue: number | null;
	peak: number | null;
	peakTime: number | null;
	recoveryTime: number | null;
	iae: number | null;
	ise: number | null;
	itae: number | null;
	peakMv: number | null;
	peakMvTime: number | null;
}

/** Value of the cubic Hermite interpolant on [t0, t1] at t (Fritsch & Carlson style basis; de Boor, A Practical Guide to Splines). */
function hermite(t0: number, t1: number, y0: number, y1: number, m0: number, m1: number, t: number): number {
	const h = t1 - t0;
	const s = (t - t0) / h;
	const s2 = s * s;
	const s3 = s2 * s;
	return (2 * s3 - 3 * s2 + 1) * y0 + (s3 - 2 * s2 + s) * h * m0 + (-2 * s3 + 3 * s2) * y1 + (s3 - s2) * h * m1;
}

/** Interpolated value of the response at time t inside interval k. */
function valueAt(r: SampledResponse, k: number, t: number): number {
	const { t: ts, y, dy } = r;
	if (dy) return hermite(ts[k], ts[k + 1], y[k], y[k + 1], dy[k], dy[k + 1], t);
	const s = (t - ts[k]) / (ts[k + 1] - ts[k]);
	return y[k] + s * (y[k + 1] - y[k]);
}

/** Time in interval k where the interpolated response equals level (brackets assumed). */
function crossingIn(r: SampledResponse, k: number, level: number): number {
	const t0 = r.t[k];
	const t1 = r.t[k + 1];
	const y0 = r.y[k] - level;
	const y1 = r.y[k + 1] - level;
	if (y0 === 0) return t0;
	if (y1 === 0) return t1;
	if (r.dy) {
		const root = brentRoot((t) => valueAt(r, k, t) - level, t0, t1, 1e-15 * Math.max(1, Math.abs(t1)));
		if (root !== null) return root;
	}
	return t0 + (t1 - t0) * (y0 / (y0 - y1));
}

/** First time the response reaches `level` going in direction `sign` (±1); null if never. */
export function firstReach(r: SampledResponse, level: number, sign: number): number | null {
	const n = r.y.length;
	if (n === 0) return null;
	if (sign * (r.y[0] - level) >= 0) return r.t[0];
	for (let k = 0; k < n - 1; k++) {
		if (sign * (r.y[k + 1] - level) >= 0) return crossingIn(r, k, level);
	}
	return null;
}

/** Indices of the largest and smallest PV sample, of the largest |PV| and of the largest |MV| (first of equals). */
interface SampleExtremes {
	max: number;
	min: number;
	absMax: number;
	absMaxU: number;
}

/** One pass over the samples for `SampleExtremes`. */
function sampleExtremes(y: ArrayLike<number>, u: ArrayLike<number>): SampleExtremes {
	let max = 0;
	let min = 0;
	let absMax = 0;
	let yMax = y[0];
	let yMin = y[0];
	let yAbs = Math.abs(y[0]);
	for (let i = 1; i < y.length; i++) {
		const v = y[i];
		if (v > yMax) {
			yMax = v;
			max = i;
		}
		if (v < yMin) {
			yMin = v;
			min = i;
		}
		const a = Math.abs(v);
		if (a > yAbs) {
			yAbs = a;
			absMax = i;
		}
	}
	let absMaxU = 0;
	let uAbs = Math.abs(u[0]);
	for (let i = 1; i < u.length; i++) {
		const a = Math.abs(u[i]);
		if (a > uAbs) {
			uAbs = a;
			absMaxU = i;
		}
	}
	return { max, min, absMax, absMaxU };
}

/**
 * Maximum of sign·y with its time, refined between samples; `at` is the index of the largest
 * sample of sign·y when already known.
 */
export function extremum(r: SampledResponse, sign: number, at?: number): { value: number; time: number } {
	const n = r.y.length;
	let k = 0;
	if (at !== undefined) k = at;
	else for (let i = 1; i < n; i++) if (sign * r.y[i] > sign * r.y[k]) k = i;
	let bestT = r.t[k];
	let bestV = r.y[k];
	if (k > 0 && k < n - 1) {
		if (r.dy) {
			for (const seg of [k - 1, k]) {
				const res = brentMinimize((t) => -sign * valueAt(r, seg, t), r.t[seg], r.t[seg + 1]);
				const v = -sign * res.fx;
				if (sign * v > sign * bestV) {
					bestV = v;
					bestT = res.x;
				}
			}
		} else {
			// Parabola through the three samples around the discrete maximum.
			const t0 = r.t[k - 1];
			const t1 = r.t[k];
			const t2 = r.t[k + 1];
			const y0 = r.y[k - 1];
			const y1 = r.y[k];
			const y2 = r.y[k + 1];
			const d1 = (y1 - y0) / (t1 - t0);
			const d2 = (y2 - y1) / (t2 - t1);
			const a = (d2 - d1) / (t2 - t0);
			if (a * sign < 0) {
				const tv = 0.5 * (t0 + t1) - d1 / (2 * a);
				if (tv > t0 && tv < t2) {
					const cand = y0 + d1 * (tv - t0) + a * (tv - t0) * (tv - t1);
					if (sign * cand >= sign * bestV) {
						bestV = cand;
						bestT = tv;
					}
				}
			}
		}
	}
	return { value: bestV, time: bestT };
}

/**
 * Last time the response is outside level ± halfWidth (the settling instant), 0 if it never is,
 * null if it is still outside at the last sample.
 */
export function lastExit(r: SampledResponse, level: number, halfWidth: number): number | null {
	const n = r.y.length;
	let k = -1;
	for (let i = n - 1; i >= 0; i--) {
		if (Math.abs(r.y[i] - level) > halfWidth) {
			k = i;
			break;
		}
	}
	if (k < 0) return 0;
	if (k === n - 1) return null;
	const boundary = r.y[k] > level ? level + halfWidth : level - halfWidth;
	// With Hermite interpolation the curve may leave the tube again inside the next interval;
	// search backwards from the last sample interval for the final exit.
	if (r.dy) {
		const t0 = r.t[k];
		const t1 = r.t[k + 1];
		const g = (t: number) => Math.abs(valueAt(r, k, t) - level) - halfWidth;
		// Scan the interval finely for the last sign change of g.
		const steps = 16;
		let prevT = t1;
		let prevG = g(t1);
		for (let s = steps - 1; s >= 0; s--) {
			const tt = t0 + ((t1 - t0) * s) / steps;
			const gg = g(tt);
			if (gg > 0 && prevG <= 0) {
				const root = brentRoot(g, tt, prevT, 1e-15 * Math.max(1, Math.abs(t1)));
				if (root !== null) return root;
			}
			prevT = tt;
			prevG = gg;
		}
	}
	return crossingIn(r, k, boundary);
}

/**
 * ∫|e|, ∫e², ∫t·|e| over the samples: trapezoidal rule on each interval, with the endpoint
 * derivative correction h²/12·(f′(t0) − f′(t1)) when exact derivatives de are given (exact for
 * cubics; Davis & Rabinowitz, Methods of Numerical Integration, 2nd ed., §2.9, "corrected
 * trapezoidal rule"). Intervals where e changes sign are split at the linear zero crossing.
 */
export function errorIntegrals(t: ArrayLike<number>, e: ArrayLike<number>, de?: ArrayLike<number> | null): { iae: number; ise: number; itae: number } {
	// |−e| = |e| and (−e)² = e²: the integrals of e equal those of reference 0 minus e.
	return trackingIntegrals(t, e, de ?? null, 0);
}

/** The integrals of `errorIntegrals` for the tracking error e = reference − y (de = −dy). */
function trackingIntegrals(t: ArrayLike<number>, y: ArrayLike<number>, dy: ArrayLike<number> | null, reference: number): { iae: number; ise: number; itae: number } {
	let iae = 0;
	let ise = 0;
	let itae = 0;
	const n = y.length;
	if (n < 2) return { iae, ise, itae };
	// The left end of each interval is carried over from the previous one.
	let t0 = t[0];
	let e0 = reference - y[0];
	let d0 = dy !== null ? -dy[0] : 0;
	for (let k = 0; k < n - 1; k++) {
		const t1 = t[k + 1];
		const e1 = reference - y[k + 1];
		const d1 = dy !== null ? -dy[k + 1] : 0;
		const h = t1 - t0;
		const sameSign = e0 >= 0 === e1 >= 0 || e0 === 0 || e1 === 0;
		if (dy !== null && sameSign) {
			const s = e0 > 0 || e1 > 0 ? 1 : -1;
			const c = (h * h) / 12;
			iae += s * (0.5 * h * (e0 + e1) + c * (d0 - d1));
			ise += 0.5 * h * (e0 * e0 + e1 * e1) + c * (2 * e0 * d0 - 2 * e1 * d1);
			itae += s * (0.5 * h * (t0 * e0 + t1 * e1) + c * (e0 + t0 * d0 - e1 - t1 * d1));
		} else {
			ise += (h * (e0 * e0 + e0 * e1 + e1 * e1)) / 3;
			const a0 = Math.abs(e0);
			const a1 = Math.abs(e1);
			if (sameSign) {
				iae += 0.5 * h * (a0 + a1);
				itae += (h / 6) * (2 * t0 * a0 + t0 * a1 + t1 * a0 + 2 * t1 * a1);
			} else {
				const ts = t0 + (h * e0) / (e0 - e1);
				const h0 = ts - t0;
				const h1 = t1 - ts;
				iae += 0.5 * h0 * a0 + 0.5 * h1 * a1;
				itae += (h0 / 6) * (2 * t0 * a0 + ts * a0) + (h1 / 6) * (ts * a1 + 2 * t1 * a1);
			}
		}
		t0 = t1;
		e0 = e1;
		d0 = d1;
	}
	return { iae, ise, itae };
}

/**
 * The MV sample of largest magnitude (signed) and its time. Not interpolated: the MV jumps at the
 * set-point step and at dead-time events, where a fitted curve would overshoot the jump.
 */
function peakMagnitude(t: ArrayLike<number>, u: ArrayLike<number>): { value: number; time: number } {
	let k = 0;
	for (let i = 1; i < u.length; i++) if (Math.abs(u[i]) > Math.abs(u[k])) k = i;
	return { value: u[k], time: t[k] };
}

/**
 * Metrics of a unit set-point step response. `finalValue` is the closed-loop DC gain (final
 * value theorem), `reference` the set-point (1). Rise time = t(90 %) − t(10 %) of the final value;
 * overshoot = 100·(peak − final)/|final| (0 if none); undershoot = 100·max(0, −min(sign·y))/|final|;
 * settling time = last time |y − final| > band·|final|; IAE/ISE/ITAE of e = reference − y.
 * With `mvImpulse` the peak MV is null (the MV has an impulse at t = 0).
 */
export function stepMetrics(
	r: SampledResponse,
	finalValue: number,
	band: number,
	reference = 1,
	mvImpulse = false
): { metrics: StepMetrics; reasons: Record<string, string> } {
	const reasons: Record<string, string> = {};
	const { iae, ise, itae } = trackingIntegrals(r.t, r.y, r.dy ?? null, reference);
	const ex = sampleExtremes(r.y, r.u);
	const mv = { value: r.u[ex.absMaxU], time: r.t[ex.absMaxU] };
	const metrics: StepMetrics = {
		riseTime: null,
		peak: null,
		peakTime: null,
		overshootPercent: null,
		undershootPercent: null,
		settlingTime: null,
		finalValue,
		steadyStateError: reference - finalValue,
		iae,
		ise,
		itae,
		peakMv: mvImpulse ? null : mv.value,
		peakMvTime: mvImpulse ? null : mv.time
	};
	if (mvImpulse) {
		reasons.peakMv = 'The MV has an impulse at the set-point step (ideal derivative acting on the set-point, c ≠ 0); set a derivative filter n or c = 0.';
		reasons.peakMvTime = reasons.peakMv;
	}
	const scale = Math.max(Math.abs(reference), 1e-300);
	if (Math.abs(finalValue) <= 1e-12 * scale) {
		const why = 'The final value is zero, so levels relative to it are undefined.';
		for (const k of ['riseTime', 'peak', 'peakTime', 'overshootPercent', 'undershootPercent', 'settlingTime'] as const) reasons[k] = why;
		return { metrics, reasons };
	}
	const sign = finalValue > 0 ? 1 : -1;
	const abs = Math.abs(finalValue);
	const t10 = firstReach(r, 0.1 * finalValue, sign);
	const t90 = firstReach(r, 0.9 * finalValue, sign);
	if (t10 !== null && t90 !== null) metrics.riseTime = t90 - t10;
	else reasons.riseTime = 'The response does not reach 90 % of its final value within the simulated time.';
	const pk = extremum(r, sign, sign > 0 ? ex.max : ex.min);
	metrics.peak = pk.value;
	metrics.peakTime = pk.time;
	metrics.overshootPercent = Math.max(0, (100 * (sign * pk.value - abs)) / abs);
	const low = extremum(r, -sign, sign > 0 ? ex.min : ex.max);
	metrics.undershootPercent = Math.max(0, (-100 * sign * low.value) / abs);
	const ts = lastExit(r, finalValue, band * abs);
	if (ts === null) reasons.settlingTime = `The response is still outside the ±${(band * 100).toPrecision(3)} % band at the end of the simulated time.`;
	metrics.settlingTime = ts;
	return { metrics, reasons };
}

/**
 * Metrics of a unit load step at the plant input: final PV value (DC gain of d → y), the peak
 * PV deviation (largest |y|, signed) and its time, recovery time = last time |y − final| exceeds
 * band·|peak − final|, IAE/ISE/ITAE of e = −y, peak MV (largest |u|, signed).
 */
export function disturbanceMetrics(r: SampledResponse, finalValue: number, band: number): { metrics: DisturbanceMetrics; reasons: Record<string, string> } {
	const reasons: Record<string, string> = {};
	const n = r.y.length;
	const { iae, ise, itae } = trackingIntegrals(r.t, r.y, r.dy ?? null, 0);
	const ex = n > 0 ? sampleExtremes(r.y, r.u) : null;
	const maxK = ex ? ex.absMax : 0;
	const sign = r.y[maxK] >= 0 ? 1 : -1;
	const pk = extremum(r, sign, ex ? (sign > 0 ? ex.max : ex.min) : undefined);
	const mv = ex ? { value: r.u[ex.absMaxU], time: r.t[ex.absMaxU] } : peakMagnitude(r.t, r.u);
	const dev = Math.abs(pk.value - finalValue);
	let recovery: number | null = null;
	if (dev > 0) {
		recovery = lastExit(r, finalValue, band * dev);
		if (recovery === null) reasons.recoveryTime = 'The PV has not recovered within the simulated time.';
	} else recovery = 0;
	return {
		metrics: { finalValue, peak: pk.value, peakTime: pk.time, recoveryTime: recovery, iae, ise, itae, peakMv: mv.value, peakMvTime: mv.time },
		reasons
	};
}
