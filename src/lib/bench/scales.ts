/**
 * Slider scales of the bench and the reference magnitudes they are centred on. A slider is an
 * integer position 0…SLIDER_STEPS mapped to a value on a logarithmic scale (for settings whose
 * sensible range spans decades: Kp, Ti, Td, N) or a linear one (set-point weights b, c).
 * Pure functions, no DOM: shared by the bench state, its components and the unit tests.
 */

/** Positions of every bench slider: 0 … SLIDER_STEPS (1000 steps: 0.7 % per step over three decades). */
export const SLIDER_STEPS = 1000;

/** A slider scale from `min` to `max` (both > 0 for a log scale). */
export interface SliderScale {
	kind: 'log' | 'linear';
	min: number;
	max: number;
}

/**
 * The slider position of `value` on `scale`, rounded to an integer and clamped to 0…SLIDER_STEPS.
 * Log scale: p = P·log(v/min)/log(max/min) (the usual logarithmic mapping, common practice);
 * linear: p = P·(v − min)/(max − min). Non-finite values and, on a log scale, values ≤ 0 give 0.
 */
export function positionOf(scale: SliderScale, value: number): number {
	if (!Number.isFinite(value)) return 0;
	let f: number;
	if (scale.kind === 'log') {
		if (value <= 0) return 0;
		f = Math.log(value / scale.min) / Math.log(scale.max / scale.min);
	} else {
		f = (value - scale.min) / (scale.max - scale.min);
	}
	return Math.min(SLIDER_STEPS, Math.max(0, Math.round(f * SLIDER_STEPS)));
}

/**
 * The value at slider position `position` (clamped to 0…SLIDER_STEPS): min·(max/min)^(p/P) on a
 * log scale, min + (max − min)·p/P on a linear one. Always finite for a valid scale.
 */
export function valueAt(scale: SliderScale, position: number): number {
	const p = Math.min(SLIDER_STEPS, Math.max(0, Number.isFinite(position) ? position : 0)) / SLIDER_STEPS;
	if (scale.kind === 'log') return scale.min * Math.pow(scale.max / scale.min, p);
	return scale.min + (scale.max - scale.min) * p;
}

/** A log scale from centre/10^down to centre·10^up (centre > 0; `down`, `up` in decades). */
export function logScaleAround(centre: number, down: number, up: number): SliderScale {
	const c = Number.isFinite(centre) && centre > 0 ? centre : 1;
	return { kind: 'log', min: c / Math.pow(10, down), max: c * Math.pow(10, up) };
}

/**
 * The same scale widened (log: by a factor 3 beyond the value; linear: to the value) when
 * `value` lies outside it, so a typed value always has a slider position. Unchanged otherwise.
 */
export function widenToInclude(scale: SliderScale, value: number): SliderScale {
	if (!Number.isFinite(value)) return scale;
	if (scale.kind === 'log') {
		const v = Math.abs(value);
		if (v === 0) return scale;
		if (v < scale.min) return { ...scale, min: v / 3 };
		if (v > scale.max) return { ...scale, max: v * 3 };
		return scale;
	}
	if (value < scale.min) return { ...scale, min: value };
	if (value > scale.max) return { ...scale, max: value };
	return scale;
}

/** Removes leading zero coefficients (descending powers). */
function trimLeading(p: readonly number[]): number[] {
	let i = 0;
	while (i < p.length - 1 && p[i] === 0) i++;
	return p.slice(i);
}

/** Number of trailing zero coefficients: poles (or zeros) at the origin. */
function trailingZeros(p: readonly number[]): number {
	let k = 0;
	for (let i = p.length - 1; i > 0 && p[i] === 0; i--) k++;
	return k;
}

/**
 * A characteristic time of a plant with denominator `den`, numerator `num` and dead time θ in
 * seconds, to centre the Ti and Td sliders: θ plus the larger of the sum of the time constants
 * (a1/a0 of the denominator without its poles at the origin; the sum of the τi of Π(τi s + 1))
 * and 1/ωn = √(a2/a0) (for lightly damped poles, where a1/a0 is small), plus the time constant
 * T = −b1/b0 of a right-half-plane zero (−Ts + 1), which acts like extra dead time (Skogestad
 * 2003, half rule). Falls back to θ, then to 1 s. Always finite and > 0.
 */
export function plantTimeScale(den: readonly number[], delay: number, num: readonly number[] = []): number {
	const d = trimLeading(den);
	const k = trailingZeros(d);
	const core = d.slice(0, d.length - k);
	const theta = Number.isFinite(delay) && delay > 0 ? delay : 0;
	let lag = 0;
	const n = core.length;
	if (n >= 2 && core[n - 1] !== 0) {
		const a0 = core[n - 1];
		const a1 = core[n - 2];
		lag = Math.abs(a1 / a0);
		if (n >= 3) lag = Math.max(lag, Math.sqrt(Math.abs(core[n - 3] / a0)));
	}
	const nn = trimLeading(num);
	const kz = trailingZeros(nn);
	const ncore = nn.slice(0, nn.length - kz);
	const m = ncore.length;
	// (−Ts + 1)·… has b1/b0 < 0: the sum of the right-half-plane zero time constants when alone.
	const rhp = m >= 2 && ncore[m - 1] !== 0 && ncore[m - 2] / ncore[m - 1] < 0 ? -ncore[m - 2] / ncore[m - 1] : 0;
	const t = lag + theta + (Number.isFinite(rhp) ? rhp : 0);
	if (Number.isFinite(t) && t > 0) return t;
	return theta > 0 ? theta : 1;
}

/**
 * The plant's effective gain for centring the Kp slider: the steady-state gain num(0)/den(0)
 * of a self-regulating plant; for a plant with r poles at the origin, the gain of s^r·G(s) at 0
 * multiplied by T^r (T = plantTimeScale), i.e. the output change over one characteristic time.
 * Null when the plant has a zero at the origin or the gain is not finite.
 */
export function plantEffectiveGain(num: readonly number[], den: readonly number[], delay: number): number | null {
	const nn = trimLeading(num);
	const d = trimLeading(den);
	const r = trailingZeros(d);
	const n0 = nn[nn.length - 1];
	const d0 = d[d.length - 1 - r];
	if (!n0 || !d0) return null;
	const g = (n0 / d0) * Math.pow(plantTimeScale(den, delay, num), r);
	return Number.isFinite(g) && g !== 0 ? g : null;
}

/**
 * A "nice" step size near `x` (1, 2 or 5 times a power of ten, rounded down), for the default
 * set-point and load steps. Returns 1 for non-positive or non-finite input.
 */
export function niceStep(x: number): number {
	if (!(Number.isFinite(x) && x > 0)) return 1;
	const p = Math.pow(10, Math.floor(Math.log10(x)));
	const m = x / p;
	const nice = m >= 5 ? 5 : m >= 2 ? 2 : 1;
	return nice * p;
}
