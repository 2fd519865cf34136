/**
 * The large-change rule of the review: approving a revision whose gain, any time constant or the
 * dead time moved by MORE than 20 % against the previous approved revision — or whose structure
 * changed — needs a review comment. Pure; relative imports only.
 *
 * Boundary: exactly 20 % is NOT large. The rule says "more than 20 %", so the comparison is
 * strict; a relative tolerance of 1e-9 keeps changes that are exactly 20 % in decimal but not in
 * binary floating point (0.65 → 0.78 computes as 0.2000000000000001) on the "not large" side.
 */

/** A change is large when |new − old| / |old| exceeds this fraction (common practice for MOC review). */
export const LARGE_CHANGE_FRACTION = 0.2;
const TOLERANCE = 1e-9;

/** The values the rule compares; times in seconds, ωn in rad/s. */
export interface ChangeSnapshot {
	structure: string;
	parameters: {
		k?: number | null;
		tau?: number | null;
		tau2?: number | null;
		zeta?: number | null;
		wn?: number | null;
		theta?: number | null;
		num?: number[] | null;
		den?: number[] | null;
	};
	/** Listing gain (for rational models the DC or integrating gain). */
	gain?: number | null;
	/** Listing time constant in seconds (for rational models, if known). */
	timeConstantSeconds?: number | null;
	delaySeconds?: number | null;
}

/** One reason a change counts as large. */
export interface LargeChange {
	/** `structure`, `gain`, `tau`, `tau2`, `period` (natural period 1/ωn, s), `timeConstant`, `theta`. */
	parameter: string;
	from: number | string | null;
	to: number | string | null;
	/** Signed change in % of the old value; null when the old value is 0 (any change is large). */
	changePercent: number | null;
	/** One line for the reviewer, e.g. "gain K changed by −35 % (0.81 → 0.53)". */
	message: string;
}

/**
 * Signed relative change (new − old)/|old| as a fraction; null when old is 0 and new is not
 * (unbounded), 0 when both are 0.
 */
export function relativeChange(from: number, to: number): number | null {
	if (from === 0) return to === 0 ? 0 : null;
	return (to - from) / Math.abs(from);
}

/** True when the relative change from `from` to `to` is more than 20 % (strictly; see the module note). */
export function isLargeChange(from: number, to: number): boolean {
	const r = relativeChange(from, to);
	if (r === null) return true;
	return Math.abs(r) > LARGE_CHANGE_FRACTION * (1 + TOLERANCE);
}

/** The structure variant a snapshot is written in, e.g. `sopdt:damping` vs `sopdt:time_constants`. */
export function structureVariant(s: ChangeSnapshot): string {
	const p = s.parameters;
	if (s.structure === 'sopdt') return isNum(p.tau2) ? 'sopdt:time_constants' : 'sopdt:damping';
	if (s.structure === 'rational') {
		const n = (p.num ?? []).length;
		const d = (p.den ?? []).length;
		return `rational:${n}/${d}`;
	}
	return s.structure;
}

const VARIANT_LABELS: Record<string, string> = {
	fopdt: 'first order plus dead time',
	'sopdt:time_constants': 'second order plus dead time (two time constants)',
	'sopdt:damping': 'second order plus dead time (damping ratio and natural frequency)',
	ipdt: 'integrating plus dead time',
	second_order: 'standard second order'
};

function variantLabel(v: string): string {
	if (v.startsWith('rational:')) {
		const [n, d] = v.slice(9).split('/').map(Number);
		return `rational (numerator order ${Math.max(0, n - 1)}, denominator order ${Math.max(0, d - 1)})`;
	}
	return VARIANT_LABELS[v] ?? v;
}

function isNum(v: unknown): v is number {
	return typeof v === 'number' && Number.isFinite(v);
}

function fmt(v: number): string {
	return Number(v.toPrecision(4)).toString();
}

function percentText(r: number | null): string {
	if (r === null) return 'from zero';
	const p = Math.round(r * 1000) / 10;
	return `by ${p > 0 ? '+' : p < 0 ? '−' : ''}${Math.abs(p)} %`;
}

function compare(out: LargeChange[], parameter: string, label: string, from: unknown, to: unknown, unit = ''): void {
	if (!isNum(from) || !isNum(to)) return;
	if (!isLargeChange(from, to)) return;
	const r = relativeChange(from, to);
	out.push({
		parameter,
		from,
		to,
		changePercent: r === null ? null : r * 100,
		message: `${label} changed ${percentText(r)} (${fmt(from)}${unit} → ${fmt(to)}${unit})`
	});
}

/**
 * The reasons the change from `previous` (the current approved revision) to `next` counts as
 * large; empty when it does not, or when there is no previous approved revision. Compared: the
 * structure (and its variant: SOPDT by two time constants vs by ζ/ωn, rational model orders); the
 * gain K or Kv (rational: the listing gain); τ, τ2 and the natural period 1/ωn; the listing time
 * constant of rational models; the dead time θ. The damping ratio ζ is not a time constant and
 * is not compared.
 */
export function largeChanges(previous: ChangeSnapshot | null, next: ChangeSnapshot): LargeChange[] {
	if (!previous) return [];
	const out: LargeChange[] = [];
	const va = structureVariant(previous);
	const vb = structureVariant(next);
	if (va !== vb) {
		out.push({
			parameter: 'structure',
			from: va,
			to: vb,
			changePercent: null,
			message: `structure changed from ${variantLabel(va)} to ${variantLabel(vb)}`
		});
		// Parameters of different structures do not compare one to one; the gain and dead time do.
		compare(out, 'gain', 'gain', previous.gain ?? previous.parameters.k, next.gain ?? next.parameters.k);
		compare(out, 'theta', 'dead time θ', previous.delaySeconds ?? previous.parameters.theta ?? 0, next.delaySeconds ?? next.parameters.theta ?? 0, ' s');
		return out;
	}
	const a = previous.parameters;
	const b = next.parameters;
	if (previous.structure === 'rational') {
		compare(out, 'gain', 'gain', previous.gain, next.gain);
		compare(out, 'timeConstant', 'dominant time constant', previous.timeConstantSeconds, next.timeConstantSeconds, ' s');
	} else {
		compare(out, 'gain', previous.structure === 'ipdt' ? 'integrating gain Kv' : 'gain K', a.k, b.k);
		compare(out, 'tau', 'time constant τ', a.tau, b.tau, ' s');
		compare(out, 'tau2', 'time constant τ2', a.tau2, b.tau2, ' s');
		if (isNum(a.wn) && isNum(b.wn) && a.wn > 0 && b.wn > 0) {
			compare(out, 'period', 'natural period 1/ωn', 1 / a.wn, 1 / b.wn, ' s');
		}
	}
	compare(out, 'theta', 'dead time θ', previous.delaySeconds ?? a.theta ?? 0, next.delaySeconds ?? b.theta ?? 0, ' s');
	return out;
}
