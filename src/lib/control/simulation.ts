/**
 * Time response of the loop to a unit set-point step and to a unit load step at the plant input,
 * PV (y) and controller output (MV, u), with the dead time simulated exactly by a delay line —
 * not by a Padé approximation.
 *
 * Loop: u = Cr·r − C·y (controller as parallel terms p, i, d, Tf with weights b, c), plant
 * y = G(s)·e^(−θs)·(u + d). Because the loop is linear and time-invariant, the dead time may be
 * moved in front of the controller: w(t) = u(t − θ) is the controller's response to the delayed
 * signals r(t − θ), y(t − θ), and the plant input is w + d(t − θ). The controller and plant
 * states are integrated by their exact discretisation (matrix exponential; Van Loan, IEEE Trans.
 * Autom. Control 23 (1978) 395–404) with the delayed PV interpolated linearly between samples (a
 * first-order hold) and the delayed step placed exactly at t = θ, even between samples. Only the
 * load-step response y_d is simulated this way; the set-point response follows from it exactly as
 * y_r = Cr·y_d (Y_r(s) = Cr(s)·Y_d(s)), the set-point path applied to the sampled y_d — except
 * with an ideal derivative on the set-point (c ≠ 0), which is simulated directly. The MV
 * u = Cr·r − C·y is computed in original time from the controller alone, driven by the step and
 * the PV (same interpolation). The only approximation is that interpolation (error O(h²) for a
 * smooth PV).
 * Without dead time the closed loop is discretised exactly (zero-order hold of the constant
 * step input is exact).
 *
 * Grid: the user grid has `points` samples on [0, tEnd]. With dead time the internal step is
 * h = Δ/q with Δ the user spacing and q the smallest integer with h ≤ θ (needed by the explicit
 * delay line) and h·|p| ≤ 2 for the fastest plant pole p, at most 64; a dead time below Δ/64 is
 * neglected in the time response (with a note). Without dead time h = Δ (exact at any step).
 *
 * Speed: for loops of up to six states the time loops run on scalar locals (`delayLineRunSmall`,
 * `delayFreeRunSmall`), several times faster in V8 than the indexed loops kept for larger ones;
 * a unit test holds the two equal.
 */
import type { Complex, TransferFunction } from './types';
import type { ControllerTerms } from './controller';
import { AnalysisInputError } from './errors';
import { balance, expm, type Matrix } from './linalg';
import { SLOT, scratch } from './workspace';
import { polyTrim } from './polynomial';
import { roots } from './roots';
import { modulus } from './complex';

/** Controllable-canonical state-space realisation (A, B, C, D) of a proper num/den, balanced. */
export interface StateSpace {
	n: number;
	a: Float64Array;
	b: Float64Array;
	c: Float64Array;
	d: number;
}

/**
 * Controllable canonical realisation of a proper rational G = num/den (Kailath, Linear Systems,
 * 1980, §2.1), then diagonally balanced (Parlett–Reinsch) for a better-conditioned exponential.
 * Throws when the model is improper.
 */
export function realize(num: readonly number[], den: readonly number[]): StateSpace {
	const d0 = polyTrim(den);
	const n0 = polyTrim(num);
	const n = d0.length - 1;
	if (n0.length - 1 > n) throw new AnalysisInputError('plant.num', 'The plant is improper (more zeros than poles).');
	const lead = d0[0];
	const a1 = d0.map((c) => c / lead);
	const b1 = new Array<number>(n + 1).fill(0);
	for (let i = 0; i < n0.length; i++) b1[n + 1 - n0.length + i] = n0[i] / lead;
	const a = new Float64Array(n * n);
	const b = new Float64Array(n);
	const c = new Float64Array(n);
	if (n > 0) {
		for (let j = 0; j < n; j++) a[j] = -a1[j + 1];
		for (let i = 1; i < n; i++) a[i * n + i - 1] = 1;
		b[0] = 1;
		for (let j = 0; j < n; j++) c[j] = b1[j + 1] - b1[0] * a1[j + 1];
		const m: Matrix = { rows: n, cols: n, data: a };
		const scale = balance(m);
		for (let i = 0; i < n; i++) {
			b[i] /= scale[i];
			c[i] *= scale[i];
		}
	}
	return { n, a, b, c, d: b1[0] };
}

/** One simulated response on a grid. */
export interface ResponseTrace {
	/** PV samples. */
	y: Float64Array;
	/** MV (controller output) samples; right limits at jumps. */
	u: Float64Array;
	/** dy/dt samples where exactly available (plant without direct feedthrough), else null. */
	dy: Float64Array | null;
}

/** Result of `simulateLoop`. */
export interface SimulationResult {
	/** User grid (seconds); shorter than requested when a diverging response was truncated. */
	t: Float64Array;
	setpoint: ResponseTrace;
	disturbance: ResponseTrace;
	/** Internal grid (step h) with the same responses, for event location. */
	fine: { t: Float64Array; setpoint: ResponseTrace; disturbance: ResponseTrace };
	h: number;
	substeps: number;
	method: 'exact-closed-loop' | 'delay-line';
	/** Ideal derivative with c ≠ 0: the MV has an impulse at the set-point step (not in the samples). */
	mvImpulse: boolean;
	/** Time at which a diverging response was cut (|y| above the limit), else null. */
	truncatedAt: number | null;
	notes: string[];
}

/** Options of `simulateLoop`. */
export interface SimulationOptions {
	/** Final time in seconds (> 0). */
	tEnd: number;
	/** Number of user-grid samples (≥ 2). */
	points: number;
	/** Cut the simulation once |y| exceeds this (default 1e8). */
	limit?: number;
	/** Upper bound on internal steps per user step (default 64). */
	maxSubsteps?: number;
	/** The plant poles (roots of plant.den), when the caller has them already. */
	plantPoles?: readonly Complex[];
	/** Use the indexed delay-line loop even for loops of up to six states (tests compare the two). */
	genericKernel?: boolean;
}

interface Loop {
	nz: number;
	np: number;
	ss: StateSpace;
	/** Open-loop matrix of the combined state [xp; xi; xf] with w = Kz·z + wr·rd + wy·yd + wdy·ẏd. */
	a: Float64Array;
	kz: Float64Array;
	wr: number;
	wy: number;
	wdy: number;
	br: Float64Array;
	by: Float64Array;
	bd: Float64Array;
	bdy: Float64Array;
	impulse: number;
	cpAp: Float64Array;
	cpBp: number;
}

function buildLoop(ss: StateSpace, t: ControllerTerms): Loop {
	const np = ss.n;
	const hasI = t.i !== 0;
	const hasF = t.d !== 0 && t.tf > 0;
	const ideal = t.d !== 0 && t.tf === 0;
	const ii = np;
	const fi = np + (hasI ? 1 : 0);
	const nz = np + (hasI ? 1 : 0) + (hasF ? 1 : 0);
	const kz = new Float64Array(nz);
	if (hasI) kz[ii] = t.i;
	if (hasF) kz[fi] = -t.d / t.tf;
	const wr = t.b * t.p + (hasF ? (t.c * t.d) / t.tf : 0);
	const wy = -t.p - (hasF ? t.d / t.tf : 0);
	const wdy = ideal ? -t.d : 0;
	const a = new Float64Array(nz * nz);
	for (let r = 0; r < np; r++) {
		for (let c = 0; c < np; c++) a[r * nz + c] = ss.a[r * np + c];
		for (let c = np; c < nz; c++) a[r * nz + c] = ss.b[r] * kz[c];
	}
	if (hasF) a[fi * nz + fi] = -1 / t.tf;
	const br = new Float64Array(nz);
	const by = new Float64Array(nz);
	const bd = new Float64Array(nz);
	const bdy = new Float64Array(nz);
	for (let r = 0; r < np; r++) {
		br[r] = ss.b[r] * wr;
		by[r] = ss.b[r] * wy;
		bd[r] = ss.b[r];
		bdy[r] = ss.b[r] * wdy;
	}
	if (hasI) {
		br[ii] = 1;
		by[ii] = -1;
	}
	if (hasF) {
		br[fi] = t.c / t.tf;
		by[fi] = -1 / t.tf;
	}
	const cpAp = new Float64Array(nz);
	let cpBp = 0;
	for (let c = 0; c < np; c++) {
		let s = 0;
		for (let r = 0; r < np; r++) s += ss.c[r] * ss.a[r * np + c];
		cpAp[c] = s;
	}
	for (let r = 0; r < np; r++) cpBp += ss.c[r] * ss.b[r];
	return { nz, np, ss, a, kz, wr, wy, wdy, br, by, bd, bdy, impulse: ideal ? t.c * t.d : 0, cpAp, cpBp };
}

/**
 * Exact discretisation over a length L of ẋ = A·x + Σ b_j·u_j with each input linear in time:
 * x(L) = Φ·x(0) + Σ (Γ0_j·u_j(0) + Γ1_j·(u_j(L) − u_j(0))), from one exponential of the block
 * matrix [[A, B, 0], [0, 0, R/L], [0, 0, 0]]·L (Van Loan 1978), where R selects the inputs that
 * vary (`ramp[j]`; the others are constant over the step and get Γ1 = 0).
 */
function discretize(
	a: Float64Array,
	n: number,
	cols: Float64Array[],
	L: number,
	ramp: boolean[] = cols.map(() => true)
): { phi: Float64Array; g0: Float64Array[]; g1: Float64Array[] } {
	const m = cols.length;
	const rampIdx: number[] = [];
	ramp.forEach((v, j) => v && rampIdx.push(j));
	const mr = rampIdx.length;
	const size = n + m + mr;
	const bd = scratch(SLOT.discretizeBlock, size * size);
	bd.fill(0);
	const big: Matrix = { rows: size, cols: size, data: bd };
	for (let r = 0; r < n; r++) {
		for (let c = 0; c < n; c++) bd[r * size + c] = a[r * n + c] * L;
		for (let j = 0; j < m; j++) bd[r * size + n + j] = cols[j][r] * L;
	}
	// The ramp block holds ε·I instead of I, ε a power of two no larger than ‖[A·L, B·L]‖∞ (a
	// diagonal similarity: the exponential's ramp columns come out multiplied by ε, divided out
	// exactly below), so a short step keeps the norm small and the exponential needs no squaring.
	let normTop = 0;
	for (let r = 0; r < n; r++) {
		let sum = 0;
		for (let c = 0; c < n + m; c++) sum += Math.abs(bd[r * size + c]);
		normTop = Math.max(normTop, sum);
	}
	const eps = normTop > 0 ? Math.pow(2, Math.max(-30, Math.min(0, Math.floor(Math.log2(normTop))))) : 1;
	rampIdx.forEach((j, k) => (bd[(n + j) * size + n + m + k] = eps));
	// The exponential is read right away: a scratch array (see workspace.ts).
	const e = expm(big, scratch(SLOT.discretizeExp, size * size)).data;
	const phi = new Float64Array(n * n);
	for (let r = 0; r < n; r++) for (let c = 0; c < n; c++) phi[r * n + c] = e[r * size + c];
	const g0: Float64Array[] = [];
	const g1: Float64Array[] = [];
	for (let j = 0; j < m; j++) {
		const v0 = new Float64Array(n);
		for (let r = 0; r < n; r++) v0[r] = e[r * size + n + j];
		g0.push(v0);
		g1.push(new Float64Array(n));
	}
	rampIdx.forEach((j, k) => {
		for (let r = 0; r < n; r++) g1[j][r] = e[r * size + n + m + k] / eps;
	});
	return { phi, g0, g1 };
}

function matVecInto(m: Float64Array, n: number, x: Float64Array, out: Float64Array): void {
	for (let r = 0; r < n; r++) {
		let s = 0;
		const o = r * n;
		for (let c = 0; c < n; c++) s += m[o + c] * x[c];
		out[r] = s;
	}
}

function matMulSquare(a: Float64Array, b: Float64Array, n: number): Float64Array {
	const c = new Float64Array(n * n);
	for (let i = 0; i < n; i++)
		for (let k = 0; k < n; k++) {
			const v = a[i * n + k];
			if (v === 0) continue;
			for (let j = 0; j < n; j++) c[i * n + j] += v * b[k * n + j];
		}
	return c;
}

function dot(a: Float64Array, b: Float64Array): number {
	let s = 0;
	for (let i = 0; i < a.length; i++) s += a[i] * b[i];
	return s;
}

function matVec(m: Float64Array, n: number, x: Float64Array): Float64Array {
	const out = new Float64Array(n);
	matVecInto(m, n, x, out);
	return out;
}

/**
 * Simulates the set-point step (r = 1) and the load step at the plant input (d = 1) responses of
 * the loop on [0, tEnd]; see the module comment for the method. The plant must be proper and
 * the loop proper (checked by `analyzeClosedLoop`).
 */
export function simulateLoop(plant: TransferFunction, terms: ControllerTerms, opts: SimulationOptions): SimulationResult {
	const points = Math.max(2, Math.floor(opts.points));
	const tEnd = opts.tEnd;
	const dt = tEnd / (points - 1);
	const maxSub = opts.maxSubsteps ?? 64;
	const limit = opts.limit ?? 1e8;
	const ss = realize(plant.num, plant.den);
	const loop = buildLoop(ss, terms);
	const notes: string[] = [];
	const theta = plant.delay;
	let q = 1;
	let useDelay = theta > 0;
	if (useDelay) {
		// h ≤ θ (explicit delay line) and h·|p| ≤ 2 for the fastest plant pole p, so the
		// interpolated delayed PV follows the fastest plant mode.
		let fastest = 0;
		for (const p of opts.plantPoles ?? roots(plant.den)) fastest = Math.max(fastest, modulus(p.re, p.im));
		q = Math.max(1, Math.ceil(dt / theta - 1e-9));
		if (q <= maxSub) q = Math.min(maxSub, Math.max(q, Math.ceil((dt * fastest) / 2 - 1e-9)));
		if (q > maxSub) {
			useDelay = false;
			q = 1;
			notes.push(`The dead time (${theta.toPrecision(3)} s) is below 1/${maxSub} of the sample spacing; the time response neglects it (margins and frequency response use it exactly).`);
		}
	}
	const h = dt / q;
	const result = useDelay ? simulateDelayed(loop, theta, h, q, points, limit, terms, opts.genericKernel) : simulateDelayFree(loop, h, points, limit, opts.genericKernel);
	result.notes.unshift(...notes);
	return result;
}

function userGrid(fine: { t: Float64Array; setpoint: ResponseTrace; disturbance: ResponseTrace }, q: number, count: number) {
	if (q === 1 && count === fine.t.length) return { t: fine.t, setpoint: fine.setpoint, disturbance: fine.disturbance };
	const t = new Float64Array(count);
	const pick = (src: Float64Array) => {
		const out = new Float64Array(count);
		for (let i = 0; i < count; i++) out[i] = src[i * q];
		return out;
	};
	for (let i = 0; i < count; i++) t[i] = fine.t[i * q];
	return {
		t,
		setpoint: { y: pick(fine.setpoint.y), u: pick(fine.setpoint.u), dy: fine.setpoint.dy ? pick(fine.setpoint.dy) : null },
		disturbance: { y: pick(fine.disturbance.y), u: pick(fine.disturbance.u), dy: fine.disturbance.dy ? pick(fine.disturbance.dy) : null }
	};
}

function simulateDelayFree(loop: Loop, h: number, points: number, limit: number, genericKernel = false): SimulationResult {
	const { nz, np, ss, kz, wr, wy, wdy, cpAp, cpBp } = loop;
	const dp = ss.d;
	const den = 1 - wy * dp - wdy * cpBp;
	if (Math.abs(den) <= 1e-12 * (1 + Math.abs(wy * dp) + Math.abs(wdy * cpBp)))
		throw new AnalysisInputError('controller.kp', 'The loop is ill-posed: 1 + C(∞)·G(∞) = 0.');
	// v = w + d = vz·z + vr·r + vd·d; y = cy·z + dyr·r + dyd·d.
	const vz = new Float64Array(nz);
	for (let c = 0; c < nz; c++) vz[c] = (kz[c] + (c < np ? wy * ss.c[c] + wdy * cpAp[c] : 0)) / den;
	const vr = loop.wr / den;
	const vd = 1 / den;
	const cy = new Float64Array(nz);
	for (let c = 0; c < nz; c++) cy[c] = (c < np ? ss.c[c] : 0) + dp * vz[c];
	const dyr = dp * vr;
	const dyd = dp * vd;
	// Closed-loop matrix and input columns.
	const acl = new Float64Array(nz * nz);
	const br = new Float64Array(nz);
	const bdist = new Float64Array(nz);
	for (let r = 0; r < np; r++) {
		for (let c = 0; c < np; c++) acl[r * nz + c] = ss.a[r * np + c];
		for (let c = 0; c < nz; c++) acl[r * nz + c] += ss.b[r] * vz[c];
		br[r] = ss.b[r] * vr;
		bdist[r] = ss.b[r] * vd;
	}
	// Controller rows: ẋi = r − y, ẋf = (c·r − y − xf)/Tf, from the open-loop columns.
	for (let r = np; r < nz; r++) {
		const fromR = loop.br[r];
		const fromY = loop.by[r];
		for (let c = 0; c < nz; c++) acl[r * nz + c] = loop.a[r * nz + c] + fromY * cy[c];
		br[r] = fromR + fromY * dyr;
		bdist[r] = fromY * dyd;
	}
	const { phi, g0 } = discretize(acl, nz, [br, bdist], h, [false, false]);
	const total = points;
	const zs0 = new Float64Array(nz);
	const impulse = loop.impulse !== 0;
	if (impulse) for (let r = 0; r < np; r++) zs0[r] = (ss.b[r] * loop.impulse) / den;
	// ẏ = cy·(Acl·z + b·input) for t > 0; precompute cy·Acl and cy·b.
	const cyA = new Float64Array(nz);
	for (let c = 0; c < nz; c++) {
		let s = 0;
		for (let r = 0; r < nz; r++) s += cy[r] * acl[r * nz + c];
		cyA[c] = s;
	}
	const coeffs: DelayFreeLoop = { nz, phi, gr: g0[0], gd: g0[1], cy, vz, cyA, dyr, dyd, vr, ud0: vd - 1, cyBr: dot(cy, br), cyBd: dot(cy, bdist) };
	// The seven series share one allocation.
	const store = new Float64Array(7 * total);
	const part = (i: number) => store.subarray(i * total, (i + 1) * total);
	const o: DelayFreeSeries = { t: part(0), ys: part(1), us: part(2), dys: part(3), yd: part(4), ud: part(5), dyd: part(6) };
	const stop = (nz <= 6 && !genericKernel ? delayFreeRunSmall : delayFreeRun)(coeffs, zs0, h, total, limit, o);
	const count = stop < total ? Math.max(1, stop) : total;
	const truncatedAt = stop < total ? stop * h : null;
	const { t: tFine, ys, us, dys, yd, ud, dyd: dyd2 } = o;
	const cut = (a: Float64Array) => (count === total ? a : a.slice(0, count));
	const fine = {
		t: cut(tFine),
		setpoint: { y: cut(ys), u: cut(us), dy: cut(dys) },
		disturbance: { y: cut(yd), u: cut(ud), dy: cut(dyd2) }
	};
	return {
		...userGrid(fine, 1, count),
		fine,
		h,
		substeps: 1,
		method: 'exact-closed-loop',
		mvImpulse: impulse,
		truncatedAt,
		notes: []
	};
}

/** Outputs of the delay-free time loop (see `simulateDelayFree`). */
interface DelayFreeSeries {
	t: Float64Array;
	ys: Float64Array;
	us: Float64Array;
	dys: Float64Array;
	yd: Float64Array;
	ud: Float64Array;
	dyd: Float64Array;
}

/** Coefficients of the delay-free time loop: z ← Φ·z + g, outputs c·z + constant. */
interface DelayFreeLoop {
	nz: number;
	phi: Float64Array;
	gr: Float64Array;
	gd: Float64Array;
	cy: Float64Array;
	vz: Float64Array;
	cyA: Float64Array;
	dyr: number;
	dyd: number;
	vr: number;
	ud0: number;
	cyBr: number;
	cyBd: number;
}

/**
 * The delay-free time loop for up to six states on scalar locals (padded with zeros; see
 * `delayLineRunSmall`): set-point state zs (from zs0) and load state zd (from rest). Returns the
 * index of the first sample beyond the limit, or `total` when there is none.
 */
function delayFreeRunSmall(c: DelayFreeLoop, zs0: Float64Array, h: number, total: number, limit: number, o: DelayFreeSeries): number {
	const nz = c.nz;
	if (nz > 6) throw new Error('delayFreeRunSmall: at most six states');
	const P = new Float64Array(36);
	for (let r = 0; r < nz; r++) for (let k = 0; k < nz; k++) P[r * 6 + k] = c.phi[r * nz + k];
	const gr = pad6(c.gr, 0, nz);
	const gd = pad6(c.gd, 0, nz);
	const cy = pad6(c.cy, 0, nz);
	const vz = pad6(c.vz, 0, nz);
	const cyA = pad6(c.cyA, 0, nz);
	const z0 = pad6(zs0, 0, nz);
	const { dyr, dyd, vr, ud0, cyBr, cyBd } = c;
	const uLimit = limit * 1e3;
	const p00 = P[0], p01 = P[1], p02 = P[2], p03 = P[3], p04 = P[4], p05 = P[5];
	const p10 = P[6], p11 = P[7], p12 = P[8], p13 = P[9], p14 = P[10], p15 = P[11];
	const p20 = P[12], p21 = P[13], p22 = P[14], p23 = P[15], p24 = P[16], p25 = P[17];
	const p30 = P[18], p31 = P[19], p32 = P[20], p33 = P[21], p34 = P[22], p35 = P[23];
	const p40 = P[24], p41 = P[25], p42 = P[26], p43 = P[27], p44 = P[28], p45 = P[29];
	const p50 = P[30], p51 = P[31], p52 = P[32], p53 = P[33], p54 = P[34], p55 = P[35];
	const gr0 = gr[0], gr1 = gr[1], gr2 = gr[2], gr3 = gr[3], gr4 = gr[4], gr5 = gr[5];
	const gd0 = gd[0], gd1 = gd[1], gd2 = gd[2], gd3 = gd[3], gd4 = gd[4], gd5 = gd[5];
	const cy0 = cy[0], cy1 = cy[1], cy2 = cy[2], cy3 = cy[3], cy4 = cy[4], cy5 = cy[5];
	const vz0 = vz[0], vz1 = vz[1], vz2 = vz[2], vz3 = vz[3], vz4 = vz[4], vz5 = vz[5];
	const ca0 = cyA[0], ca1 = cyA[1], ca2 = cyA[2], ca3 = cyA[3], ca4 = cyA[4], ca5 = cyA[5];
	let s0 = z0[0], s1 = z0[1], s2 = z0[2], s3 = z0[3], s4 = z0[4], s5 = z0[5];
	let d0 = 0, d1 = 0, d2 = 0, d3 = 0, d4 = 0, d5 = 0;
	for (let k = 0; k < total; k++) {
		o.t[k] = k * h;
		const ysk = cy0 * s0 + cy1 * s1 + cy2 * s2 + cy3 * s3 + cy4 * s4 + cy5 * s5 + dyr;
		const ydk = cy0 * d0 + cy1 * d1 + cy2 * d2 + cy3 * d3 + cy4 * d4 + cy5 * d5 + dyd;
		const usk = vz0 * s0 + vz1 * s1 + vz2 * s2 + vz3 * s3 + vz4 * s4 + vz5 * s5 + vr;
		const udk = vz0 * d0 + vz1 * d1 + vz2 * d2 + vz3 * d3 + vz4 * d4 + vz5 * d5 + ud0;
		o.ys[k] = ysk;
		o.yd[k] = ydk;
		o.us[k] = usk;
		o.ud[k] = udk;
		o.dys[k] = ca0 * s0 + ca1 * s1 + ca2 * s2 + ca3 * s3 + ca4 * s4 + ca5 * s5 + cyBr;
		o.dyd[k] = ca0 * d0 + ca1 * d1 + ca2 * d2 + ca3 * d3 + ca4 * d4 + ca5 * d5 + cyBd;
		if (!(Math.abs(ysk) <= limit && Math.abs(ydk) <= limit && Math.abs(usk) <= uLimit && Math.abs(udk) <= uLimit)) return k;
		if (k === total - 1) break;
		const ns0 = p00 * s0 + p01 * s1 + p02 * s2 + p03 * s3 + p04 * s4 + p05 * s5 + gr0;
		const ns1 = p10 * s0 + p11 * s1 + p12 * s2 + p13 * s3 + p14 * s4 + p15 * s5 + gr1;
		const ns2 = p20 * s0 + p21 * s1 + p22 * s2 + p23 * s3 + p24 * s4 + p25 * s5 + gr2;
		const ns3 = p30 * s0 + p31 * s1 + p32 * s2 + p33 * s3 + p34 * s4 + p35 * s5 + gr3;
		const ns4 = p40 * s0 + p41 * s1 + p42 * s2 + p43 * s3 + p44 * s4 + p45 * s5 + gr4;
		const ns5 = p50 * s0 + p51 * s1 + p52 * s2 + p53 * s3 + p54 * s4 + p55 * s5 + gr5;
		const nd0 = p00 * d0 + p01 * d1 + p02 * d2 + p03 * d3 + p04 * d4 + p05 * d5 + gd0;
		const nd1 = p10 * d0 + p11 * d1 + p12 * d2 + p13 * d3 + p14 * d4 + p15 * d5 + gd1;
		const nd2 = p20 * d0 + p21 * d1 + p22 * d2 + p23 * d3 + p24 * d4 + p25 * d5 + gd2;
		const nd3 = p30 * d0 + p31 * d1 + p32 * d2 + p33 * d3 + p34 * d4 + p35 * d5 + gd3;
		const nd4 = p40 * d0 + p41 * d1 + p42 * d2 + p43 * d3 + p44 * d4 + p45 * d5 + gd4;
		const nd5 = p50 * d0 + p51 * d1 + p52 * d2 + p53 * d3 + p54 * d4 + p55 * d5 + gd5;
		s0 = ns0; s1 = ns1; s2 = ns2; s3 = ns3; s4 = ns4; s5 = ns5;
		d0 = nd0; d1 = nd1; d2 = nd2; d3 = nd3; d4 = nd4; d5 = nd5;
	}
	return total;
}

/** `delayFreeRunSmall` for any number of states, with indexed arrays. */
function delayFreeRun(c: DelayFreeLoop, zs0: Float64Array, h: number, total: number, limit: number, o: DelayFreeSeries): number {
	const { nz, phi, gr, gd, cy, vz, cyA, dyr, dyd, vr, ud0, cyBr, cyBd } = c;
	const zs = Float64Array.from(zs0);
	const zd = new Float64Array(nz);
	const tmp = new Float64Array(nz);
	for (let k = 0; k < total; k++) {
		o.t[k] = k * h;
		const ysk = dot(cy, zs) + dyr;
		const ydk = dot(cy, zd) + dyd;
		const usk = dot(vz, zs) + vr;
		const udk = dot(vz, zd) + ud0;
		o.ys[k] = ysk;
		o.yd[k] = ydk;
		o.us[k] = usk;
		o.ud[k] = udk;
		o.dys[k] = dot(cyA, zs) + cyBr;
		o.dyd[k] = dot(cyA, zd) + cyBd;
		if (!(Math.abs(ysk) <= limit && Math.abs(ydk) <= limit && Math.abs(usk) <= limit * 1e3 && Math.abs(udk) <= limit * 1e3)) return k;
		if (k === total - 1) break;
		matVecInto(phi, nz, zs, tmp);
		for (let r = 0; r < nz; r++) zs[r] = tmp[r] + gr[r];
		matVecInto(phi, nz, zd, tmp);
		for (let r = 0; r < nz; r++) zd[r] = tmp[r] + gd[r];
	}
	return total;
}

interface DelayLine {
	nz: number;
	np: number;
	f: number;
	M: number;
	phi: Float64Array;
	cm1: Float64Array;
	c0: Float64Array;
	cp1: Float64Array;
	constS: Float64Array;
	constD: Float64Array;
	constS0: Float64Array;
	constD0: Float64Array;
}

function delayLineSetup(loop: Loop, theta: number, h: number): DelayLine {
	const { nz, np, ss } = loop;
	const ideal = loop.wdy !== 0;
	const ratio = theta / h;
	let M = Math.floor(ratio + 1e-9);
	let f = ratio - M;
	if (f < 1e-9) f = 0;
	if (M < 1) {
		M = 1;
		f = 0;
	}
	const LA = f * h;
	const LB = (1 - f) * h;
	const cols = ideal ? [loop.br, loop.by, loop.bd, loop.bdy] : [loop.br, loop.by, loop.bd];
	// Only the delayed PV varies within a piece (the delayed steps are constant on each piece).
	const ramp = cols.map((_, j) => j === 1);
	const dB = discretize(loop.a, nz, cols, LB, ramp);
	const dA = f > 0 ? discretize(loop.a, nz, cols, LA, ramp) : null;
	// Piece vectors for the delayed PV values at the piece ends (slope term for an ideal derivative).
	const pieceY = (d: { g0: Float64Array[]; g1: Float64Array[] }, L: number) => {
		const y0 = new Float64Array(nz);
		const y1 = new Float64Array(nz);
		for (let r = 0; r < nz; r++) {
			const slope = ideal ? d.g0[3][r] / L : 0;
			y0[r] = d.g0[1][r] - d.g1[1][r] - slope;
			y1[r] = d.g1[1][r] + slope;
		}
		return { y0, y1 };
	};
	const B = pieceY(dB, LB);
	const grB = dB.g0[0];
	const gdB = dB.g0[2];
	let phi: Float64Array = dB.phi;
	let hA0: Float64Array = new Float64Array(nz);
	let hA1: Float64Array = new Float64Array(nz);
	let hrA: Float64Array = new Float64Array(nz);
	let hdA: Float64Array = new Float64Array(nz);
	if (dA) {
		const A = pieceY(dA, LA);
		phi = matMulSquare(dB.phi, dA.phi, nz);
		hA0 = matVec(dB.phi, nz, A.y0);
		hA1 = matVec(dB.phi, nz, A.y1);
		hrA = matVec(dB.phi, nz, dA.g0[0]);
		hdA = matVec(dB.phi, nz, dA.g0[2]);
	}
	// The controller states are driven by the (delayed) PV and set-point only, never by the plant
	// state: the exact Φ is block upper triangular. Clear the rounding residue the exponential may
	// leave in that block, so the time loop can skip it.
	for (let r = np; r < nz; r++) for (let c = 0; c < np; c++) phi[r * nz + c] = 0;
	const impulseVec = new Float64Array(nz);
	if (loop.impulse !== 0) {
		const raw = new Float64Array(nz);
		for (let r = 0; r < np; r++) raw[r] = ss.b[r] * loop.impulse;
		matVecInto(dB.phi, nz, raw, impulseVec);
	}
	// Contributions of the delayed PV samples y(j−1), y(j), y(j+1) to the next state, with
	// yA0 = f·y(j−1) + (1−f)·y(j), yA1 = yB0 = y(j), yB1 = f·y(j) + (1−f)·y(j+1).
	const dl: DelayLine = {
		nz,
		np,
		f,
		M,
		phi,
		cm1: new Float64Array(nz),
		c0: new Float64Array(nz),
		cp1: new Float64Array(nz),
		constS: new Float64Array(nz), // r(t − θ) = 1 on both pieces (j ≥ 1)
		constD: new Float64Array(nz),
		constS0: new Float64Array(nz), // j = 0: the step (and impulse) arrives at the breakpoint
		constD0: new Float64Array(nz)
	};
	for (let r = 0; r < nz; r++) {
		dl.cm1[r] = f * hA0[r];
		dl.c0[r] = (1 - f) * hA0[r] + hA1[r] + B.y0[r] + f * B.y1[r];
		dl.cp1[r] = (1 - f) * B.y1[r];
		dl.constS[r] = hrA[r] + grB[r];
		dl.constD[r] = hdA[r] + gdB[r];
		dl.constS0[r] = grB[r] + impulseVec[r];
		dl.constD0[r] = gdB[r];
	}
	return dl;
}

/**
 * One response through the delay line: set-point step (setpoint = true) or load step. Fills Y
 * and DY (exact dy/dt when the plant has no direct feedthrough) and returns the number of
 * valid samples (fewer when |y| exceeded the limit).
 */
function delayLineRun(loop: Loop, dl: DelayLine, setpoint: boolean, n: number, limit: number, Y: Float64Array, DY: Float64Array): number {
	const { nz, np, f, M, phi, cm1, c0, cp1 } = dl;
	const { ss, kz, wr, wy, wdy, cpAp, cpBp } = loop;
	const dp = ss.d;
	const g = 1 - f;
	const ideal = wdy !== 0;
	const stepGain = setpoint ? wr : 1;
	const constFull = setpoint ? dl.constS : dl.constD;
	const constFirst = setpoint ? dl.constS0 : dl.constD0;
	let z = new Float64Array(nz);
	let t = new Float64Array(nz);
	const cpe = ss.c;
	// k < M − 1 (j < −1): nothing has reached the plant yet, the state stays at rest.
	const quiet = Math.min(n, Math.max(0, M - 1));
	Y.fill(0, 0, quiet);
	DY.fill(0, 0, quiet);
	// Pairs of rows and columns for the Φ·z product, then the odd one.
	const even = nz & ~1;
	for (let k = quiet; k < n; k++) {
		const j = k - M;
		// Delayed PV at t_k: f·y(j−1) + (1−f)·y(j) (zero before the first sample). The first two
		// samples (j = −1, 0) take the guarded reads; from j = 1 on all three samples exist.
		let yj1: number;
		let yj: number;
		let stepNow: number;
		let dyDel = 0;
		let kc: Float64Array | null;
		if (j >= 1) {
			yj1 = Y[j - 1];
			yj = Y[j];
			stepNow = 1;
			if (ideal) dyDel = f * DY[j - 1] + g * DY[j];
			kc = constFull;
		} else {
			yj1 = 0;
			yj = j === 0 ? Y[0] : 0;
			// The delayed step is 1 from j ≥ 1, or already at j = 0 when θ is on the grid.
			stepNow = j === 0 && f === 0 ? 1 : 0;
			if (ideal && j === 0) dyDel = g * DY[0];
			kc = j === 0 ? constFirst : null;
		}
		// Node outputs at t_k (right limits). Kz acts on the controller states only, Cp and Cp·Ap on
		// the plant states only.
		let kzz = 0;
		let cpz = 0;
		let daz = 0;
		for (let c = 0; c < np; c++) {
			const zc = z[c];
			cpz += cpe[c] * zc;
			daz += cpAp[c] * zc;
		}
		for (let c = np; c < nz; c++) kzz += kz[c] * z[c];
		const v = kzz + wy * (f * yj1 + g * yj) + wdy * dyDel + stepGain * stepNow;
		const yk = cpz + dp * v;
		Y[k] = yk;
		DY[k] = dp === 0 ? daz + cpBp * v : 0;
		if (!(Math.abs(yk) <= limit)) return Math.max(1, k);
		if (k === n - 1) break;
		// Next state: Φ·z plus the delayed-PV samples y(j−1), y(j), y(j+1) and the delayed step;
		// j + 1 ≤ k because M ≥ 1, so y(j+1) is known (with M = 1 it is the sample just computed).
		const yjp1 = j + 1 >= 0 ? Y[j + 1] : 0;
		// Two rows at a time with two accumulators each: four independent sums per column pair
		// (several times faster than one running sum per row; the arithmetic is the same).
		let r = 0;
		for (; r < even; r += 2) {
			const o = r * nz;
			const p = o + nz;
			let s0 = cm1[r] * yj1 + c0[r] * yj + cp1[r] * yjp1;
			let u0 = cm1[r + 1] * yj1 + c0[r + 1] * yj + cp1[r + 1] * yjp1;
			if (kc !== null) {
				s0 += kc[r];
				u0 += kc[r + 1];
			}
			let s1 = 0;
			let u1 = 0;
			// Controller rows have no plant columns (Φ is block upper triangular).
			let c = r >= np ? np : 0;
			for (; c + 1 < nz; c += 2) {
				const z0 = z[c];
				const z1 = z[c + 1];
				s0 += phi[o + c] * z0;
				s1 += phi[o + c + 1] * z1;
				u0 += phi[p + c] * z0;
				u1 += phi[p + c + 1] * z1;
			}
			if (c < nz) {
				s0 += phi[o + c] * z[c];
				u0 += phi[p + c] * z[c];
			}
			t[r] = s0 + s1;
			t[r + 1] = u0 + u1;
		}
		if (r < nz) {
			const o = r * nz;
			let s0 = cm1[r] * yj1 + c0[r] * yj + cp1[r] * yjp1;
			if (kc !== null) s0 += kc[r];
			for (let c = r >= np ? np : 0; c < nz; c++) s0 += phi[o + c] * z[c];
			t[r] = s0;
		}
		const swap = z;
		z = t;
		t = swap;
	}
	return n;
}

/** Entries from…to−1 of v in a vector of six, zeros elsewhere (the scalar kernels' padding). */
function pad6(v: ArrayLike<number>, from: number, to: number): Float64Array {
	const out = new Float64Array(6);
	for (let r = from; r < to; r++) out[r] = v[r];
	return out;
}

/**
 * `delayLineRun` for loops of at most six states, with the state, Φ and every coefficient in local
 * scalars (padded with zeros): no arrays in the step, which V8 runs several times faster than
 * the indexed loops. Same recursion, same results to rounding.
 */
function delayLineRunSmall(loop: Loop, dl: DelayLine, setpoint: boolean, n: number, limit: number, Y: Float64Array, DY: Float64Array): number {
	const { nz, np, f, M } = dl;
	const { ss, wr, wy, wdy, cpBp } = loop;
	if (nz > 6) throw new Error('delayLineRunSmall: at most six states');
	const dp = ss.d;
	const g = 1 - f;
	const ideal = wdy !== 0;
	const stepGain = setpoint ? wr : 1;
	// Φ padded to 6×6, the input and output vectors to 6 (zeros outside the loop's size).
	const P = new Float64Array(36);
	for (let r = 0; r < nz; r++) for (let c = 0; c < nz; c++) P[r * 6 + c] = dl.phi[r * nz + c];
	const [cm1, c0, cp1] = [pad6(dl.cm1, 0, nz), pad6(dl.c0, 0, nz), pad6(dl.cp1, 0, nz)];
	const kcFull = pad6(setpoint ? dl.constS : dl.constD, 0, nz);
	const kcFirst = pad6(setpoint ? dl.constS0 : dl.constD0, 0, nz);
	// Output rows: Cp and Cp·Ap on the plant states, Kz on the controller states.
	const oc = pad6(ss.c, 0, np);
	const od = pad6(loop.cpAp, 0, np);
	const ok = pad6(loop.kz, np, nz);
	const p00 = P[0], p01 = P[1], p02 = P[2], p03 = P[3], p04 = P[4], p05 = P[5];
	const p10 = P[6], p11 = P[7], p12 = P[8], p13 = P[9], p14 = P[10], p15 = P[11];
	const p20 = P[12], p21 = P[13], p22 = P[14], p23 = P[15], p24 = P[16], p25 = P[17];
	const p30 = P[18], p31 = P[19], p32 = P[20], p33 = P[21], p34 = P[22], p35 = P[23];
	const p40 = P[24], p41 = P[25], p42 = P[26], p43 = P[27], p44 = P[28], p45 = P[29];
	const p50 = P[30], p51 = P[31], p52 = P[32], p53 = P[33], p54 = P[34], p55 = P[35];
	const m0 = cm1[0], m1 = cm1[1], m2 = cm1[2], m3 = cm1[3], m4 = cm1[4], m5 = cm1[5];
	const o0 = c0[0], o1 = c0[1], o2 = c0[2], o3 = c0[3], o4 = c0[4], o5 = c0[5];
	const q0 = cp1[0], q1 = cp1[1], q2 = cp1[2], q3 = cp1[3], q4 = cp1[4], q5 = cp1[5];
	const kf0 = kcFull[0], kf1 = kcFull[1], kf2 = kcFull[2], kf3 = kcFull[3], kf4 = kcFull[4], kf5 = kcFull[5];
	const ki0 = kcFirst[0], ki1 = kcFirst[1], ki2 = kcFirst[2], ki3 = kcFirst[3], ki4 = kcFirst[4], ki5 = kcFirst[5];
	const oc0 = oc[0], oc1 = oc[1], oc2 = oc[2], oc3 = oc[3], oc4 = oc[4], oc5 = oc[5];
	const od0 = od[0], od1 = od[1], od2 = od[2], od3 = od[3], od4 = od[4], od5 = od[5];
	const ok0 = ok[0], ok1 = ok[1], ok2 = ok[2], ok3 = ok[3], ok4 = ok[4], ok5 = ok[5];
	let z0 = 0, z1 = 0, z2 = 0, z3 = 0, z4 = 0, z5 = 0;
	const quiet = Math.min(n, Math.max(0, M - 1));
	Y.fill(0, 0, quiet);
	DY.fill(0, 0, quiet);
	for (let k = quiet; k < n; k++) {
		const j = k - M;
		let yj1 = 0;
		let yj = 0;
		let stepNow = 0;
		let dyDel = 0;
		// Weights of the full and the first-sample delayed-step vectors in the next state.
		let full = 0;
		let firstW = 0;
		if (j >= 1) {
			yj1 = Y[j - 1];
			yj = Y[j];
			stepNow = 1;
			if (ideal) dyDel = f * DY[j - 1] + g * DY[j];
			full = 1;
		} else if (j === 0) {
			yj = Y[0];
			stepNow = f === 0 ? 1 : 0;
			if (ideal) dyDel = g * DY[0];
			firstW = 1;
		}
		const cpz = oc0 * z0 + oc1 * z1 + oc2 * z2 + oc3 * z3 + oc4 * z4 + oc5 * z5;
		const daz = od0 * z0 + od1 * z1 + od2 * z2 + od3 * z3 + od4 * z4 + od5 * z5;
		const kzz = ok0 * z0 + ok1 * z1 + ok2 * z2 + ok3 * z3 + ok4 * z4 + ok5 * z5;
		const v = kzz + wy * (f * yj1 + g * yj) + wdy * dyDel + stepGain * stepNow;
		const yk = cpz + dp * v;
		Y[k] = yk;
		DY[k] = dp === 0 ? daz + cpBp * v : 0;
		if (!(Math.abs(yk) <= limit)) return Math.max(1, k);
		if (k === n - 1) break;
		const yjp1 = j + 1 >= 0 ? Y[j + 1] : 0;
		const t0 = p00 * z0 + p01 * z1 + p02 * z2 + p03 * z3 + p04 * z4 + p05 * z5 + m0 * yj1 + o0 * yj + q0 * yjp1 + full * kf0 + firstW * ki0;
		const t1 = p10 * z0 + p11 * z1 + p12 * z2 + p13 * z3 + p14 * z4 + p15 * z5 + m1 * yj1 + o1 * yj + q1 * yjp1 + full * kf1 + firstW * ki1;
		const t2 = p20 * z0 + p21 * z1 + p22 * z2 + p23 * z3 + p24 * z4 + p25 * z5 + m2 * yj1 + o2 * yj + q2 * yjp1 + full * kf2 + firstW * ki2;
		const t3 = p30 * z0 + p31 * z1 + p32 * z2 + p33 * z3 + p34 * z4 + p35 * z5 + m3 * yj1 + o3 * yj + q3 * yjp1 + full * kf3 + firstW * ki3;
		const t4 = p40 * z0 + p41 * z1 + p42 * z2 + p43 * z3 + p44 * z4 + p45 * z5 + m4 * yj1 + o4 * yj + q4 * yjp1 + full * kf4 + firstW * ki4;
		const t5 = p50 * z0 + p51 * z1 + p52 * z2 + p53 * z3 + p54 * z4 + p55 * z5 + m5 * yj1 + o5 * yj + q5 * yjp1 + full * kf5 + firstW * ki5;
		z0 = t0; z1 = t1; z2 = t2; z3 = t3; z4 = t4; z5 = t5;
	}
	return n;
}

/**
 * Applies the set-point path Cr(s) = b·p + i/s + c·d·s/(1 + Tf·s) to a sampled signal x (linear
 * between samples; exact discretisation), with its derivative when dx is given (null when the
 * derivative would need d²x/dt², i.e. an ideal derivative with c ≠ 0). Used for y_r = Cr·y_d:
 * the set-point response equals the set-point path applied to the load-step response, since
 * Y_r(s) = Cr·G·e^(−θs)/(1 + C·G·e^(−θs))·1/s = Cr(s)·Y_d(s).
 */
function setpointPathOf(t: ControllerTerms, h: number, x: Float64Array, dx: Float64Array | null, count: number, out: Float64Array, dout: Float64Array | null): boolean {
	const p = t.b * t.p;
	const cd = t.c * t.d;
	const hasI = t.i !== 0;
	const filtered = cd !== 0 && t.tf > 0;
	const idealD = cd !== 0 && t.tf === 0;
	// States: integral of x; filter state xf' = (x − xf)/Tf.
	let xi = 0;
	let xf = 0;
	// Exact FOH coefficients for the two scalar states over one step.
	const oneMinusE = filtered ? -Math.expm1(-h / t.tf) : 0;
	const eF = 1 - oneMinusE;
	// For xf' = (x − xf)/Tf with x linear on the step: xf1 = eF·xf0 + (1 − eF)·x0 + g1·(x1 − x0),
	// g1 = 1 − (Tf/h)(1 − eF) (Van Loan 1978 in closed form for a scalar).
	const g1 = filtered ? 1 - (t.tf / h) * oneMinusE : 0;
	const derivOk = dx !== null && !idealD;
	for (let k = 0; k < count; k++) {
		const xk = x[k];
		let v = p * xk;
		if (hasI) v += t.i * xi;
		if (filtered) v += (cd / t.tf) * (xk - xf);
		if (idealD) v += cd * (dx ? dx[k] : 0);
		out[k] = v;
		if (dout && derivOk && dx) {
			let d = p * dx[k];
			if (hasI) d += t.i * xk;
			if (filtered) d += (cd / t.tf) * (dx[k] - (xk - xf) / t.tf);
			dout[k] = d;
		}
		if (k === count - 1) break;
		const x1 = x[k + 1];
		if (hasI) xi += 0.5 * h * (xk + x1);
		if (filtered) xf = eF * xf + oneMinusE * xk + g1 * (x1 - xk);
	}
	return derivOk;
}

function simulateDelayed(loop: Loop, theta: number, h: number, q: number, points: number, limit: number, terms: ControllerTerms, genericKernel = false): SimulationResult {
	const dp = loop.ss.d;
	const ideal = loop.wdy !== 0;
	const dl = delayLineSetup(loop, theta, h);
	const nFine = (points - 1) * q + 1;
	// The seven series share one allocation (one backing store instead of seven).
	const store = new Float64Array(7 * nFine);
	const part = (i: number) => store.subarray(i * nFine, (i + 1) * nFine);
	const Yd = part(0);
	const DYd = part(1);
	const Ys = part(2);
	let DYs: Float64Array | null = part(3);
	const run = dl.nz <= 6 && !genericKernel ? delayLineRunSmall : delayLineRun;
	let count = run(loop, dl, false, nFine, limit, Yd, DYd);
	if (loop.impulse !== 0) {
		// Ideal derivative on the set-point: y_r = Cr·y_d would need d²y_d/dt²; simulate it directly.
		count = Math.min(count, run(loop, dl, true, nFine, limit, Ys, DYs));
	} else if (!setpointPathOf(terms, h, Yd, dp === 0 ? DYd : null, count, Ys, DYs)) DYs = null;
	let truncatedAt: number | null = count < nFine ? count * h : null;
	for (let k = 0; k < count; k++) {
		if (!(Math.abs(Ys[k]) <= limit)) {
			count = Math.max(1, k);
			truncatedAt = k * h;
			break;
		}
	}
	// The MV u = Cr·r − C·y in original time, from the controller states driven by the step r and
	// the simulated PV (linear between samples, as inside the delay line).
	const Us = part(4).subarray(0, count);
	const Ud = part(5).subarray(0, count);
	const ctrl = discretizeController(loop, h);
	controllerOutputs(loop, ctrl, Ys, ideal ? DYs : null, Us, Yd, ideal ? DYd : null, Ud, count);
	for (let k = 0; k < count; k++) {
		if (!(Math.abs(Us[k]) <= limit * 1e3 && Math.abs(Ud[k]) <= limit * 1e3)) {
			count = Math.max(1, k);
			truncatedAt = k * h;
			break;
		}
	}
	const tFine = part(6).subarray(0, count);
	for (let k = 0; k < count; k++) tFine[k] = k * h;
	const cut = (x: Float64Array) => (x.length === count ? x : x.slice(0, count));
	const fine = {
		t: tFine,
		setpoint: { y: cut(Ys), u: cut(Us), dy: dp === 0 && DYs ? cut(DYs) : null },
		disturbance: { y: cut(Yd), u: cut(Ud), dy: dp === 0 ? cut(DYd) : null }
	};
	const userCount = Math.floor((count - 1) / q) + 1;
	return {
		...userGrid(fine, q, userCount),
		fine,
		h,
		substeps: q,
		method: 'delay-line',
		mvImpulse: loop.impulse !== 0,
		truncatedAt: truncatedAt === null ? null : Math.max(0, (userCount - 1) * q * h),
		notes: []
	};
}

/** Exact discretisation of the controller states (integral, derivative filter) over one step h. */
interface DiscreteController {
	nc: number;
	phi: Float64Array;
	gr: Float64Array;
	gy0: Float64Array;
	gy1: Float64Array;
	kc: Float64Array;
}

function discretizeController(loop: Loop, h: number): DiscreteController {
	const { nz, np } = loop;
	const nc = nz - np;
	const phi = new Float64Array(nc * nc);
	const gr = new Float64Array(nc);
	const gy0 = new Float64Array(nc);
	const gy1 = new Float64Array(nc);
	const kc = new Float64Array(nc);
	for (let i = 0; i < nc; i++)
		for (let j = 0; j < nc; j++)
			if (i !== j && loop.a[(np + i) * nz + np + j] !== 0) throw new Error('discretizeController: coupled controller states');
	// The controller states (integral, derivative filter) are decoupled scalars ẋ = a·x + b_r·r + b_y·y
	// (a = 0 or −1/Tf): their exact discretisation with y linear on the step is closed-form,
	// x1 = e^(ah)·x0 + (e^(ah) − 1)/a·(b_r·r + b_y·y0) + (e^(ah) − 1 − ah)/(a²h)·b_y·(y1 − y0)
	// (Van Loan 1978 for a scalar; the limits h and h/2 at a = 0, a series for small |ah|).
	for (let i = 0; i < nc; i++) {
		const a = loop.a[(np + i) * nz + np + i];
		const br = loop.br[np + i];
		const by = loop.by[np + i];
		const x = a * h;
		let e0: number; // (e^(ah) − 1)/a
		let e1: number; // (e^(ah) − 1 − ah)/(a²h)
		if (Math.abs(x) < 1e-3) {
			e0 = h * (1 + x / 2 + (x * x) / 6 + (x * x * x) / 24);
			e1 = h * (0.5 + x / 6 + (x * x) / 24 + (x * x * x) / 120);
		} else {
			const em1 = Math.expm1(x);
			e0 = em1 / a;
			e1 = (em1 - x) / (a * x);
		}
		phi[i * nc + i] = 1 + x * (e0 / h);
		gr[i] = e0 * br;
		gy0[i] = e0 * by;
		gy1[i] = e1 * by;
		kc[i] = loop.kz[np + i];
	}
	return { nc, phi, gr, gy0, gy1, kc };
}

/**
 * Controller outputs u_k = Kc·xc + wr·r + wy·y_k + wdy·ẏ_k at the samples of both tests in one
 * pass: the set-point test (r = 1 from t = 0, PV ys) and the load test (r = 0, PV yd). The states
 * xc (integral, derivative filter; at most two) are driven by r and by y linear between samples
 * (exact first-order-hold discretisation) and held in scalars, padded with zeros to two.
 */
function controllerOutputs(
	loop: Loop,
	d: DiscreteController,
	ys: Float64Array,
	dys: Float64Array | null,
	us: Float64Array,
	yd: Float64Array,
	dyd: Float64Array | null,
	ud: Float64Array,
	count: number
): void {
	const { wr, wy, wdy } = loop;
	const { nc, phi, gr, gy0, gy1, kc } = d;
	if (nc > 2) throw new Error('controllerOutputs: at most two controller states');
	const p00 = nc > 0 ? phi[0] : 0;
	const p01 = nc > 1 ? phi[1] : 0;
	const p10 = nc > 1 ? phi[nc] : 0;
	const p11 = nc > 1 ? phi[nc + 1] : 0;
	const k0 = nc > 0 ? kc[0] : 0;
	const k1 = nc > 1 ? kc[1] : 0;
	// The set-point (r = 1) enters the set-point test only.
	const r0 = nc > 0 ? gr[0] : 0;
	const r1 = nc > 1 ? gr[1] : 0;
	const a0 = nc > 0 ? gy0[0] : 0;
	const a1 = nc > 1 ? gy0[1] : 0;
	const b0 = nc > 0 ? gy1[0] : 0;
	const b1 = nc > 1 ? gy1[1] : 0;
	const gs = dys ? wdy : 0;
	const gd = dyd ? wdy : 0;
	let s0 = 0;
	let s1 = 0;
	let e0 = 0;
	let e1 = 0;
	for (let k = 0; k < count; k++) {
		const ysk = ys[k];
		const ydk = yd[k];
		us[k] = wr + wy * ysk + (dys ? gs * dys[k] : 0) + k0 * s0 + k1 * s1;
		ud[k] = wy * ydk + (dyd ? gd * dyd[k] : 0) + k0 * e0 + k1 * e1;
		if (k === count - 1) break;
		const dS = ys[k + 1] - ysk;
		const dD = yd[k + 1] - ydk;
		const ns0 = p00 * s0 + p01 * s1 + r0 + a0 * ysk + b0 * dS;
		s1 = p10 * s0 + p11 * s1 + r1 + a1 * ysk + b1 * dS;
		s0 = ns0;
		const ne0 = p00 * e0 + p01 * e1 + a0 * ydk + b0 * dD;
		e1 = p10 * e0 + p11 * e1 + a1 * ydk + b1 * dD;
		e0 = ne0;
	}
}
