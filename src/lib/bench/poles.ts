/**
 * The pole map's view and text: which part of the s-plane to show (the slow, dominant poles by
 * default — the Padé approximant of a dead time adds fast poles and zeros far out) with equal
 * scales on both axes, and complex numbers written for people. Pure; display units (1/time).
 */
import type { Complex } from '../control';
import { formatSig } from '../format';
import type { PoleView } from './chart-options';

/** Poles within this factor of the slowest one count as "near the origin". */
export const NEAR_FACTOR = 20;

/**
 * The view for poles and zeros (already in display units): `near` frames the poles within
 * NEAR_FACTOR of the slowest non-zero pole, `all` every pole and zero. The x range is −R … at
 * least 0.25·R (so the imaginary axis and some of the right half-plane show), R = 1.25·max|p|;
 * the y range is symmetric and scaled so one unit is as long on both axes for a plot of
 * `heightOverWidth`, widened (both axes) when a pole would fall outside.
 */
export function poleView(poles: readonly Complex[], zeros: readonly Complex[], heightOverWidth: number, mode: 'near' | 'all' = 'near'): PoleView {
	const mag = (p: Complex) => Math.hypot(p.re, p.im);
	const finite = (p: Complex) => Number.isFinite(p.re) && Number.isFinite(p.im);
	const ps = poles.filter(finite);
	const nonzero = ps.map(mag).filter((m) => m > 0);
	const slowest = nonzero.length ? Math.min(...nonzero) : 0;
	const shown = mode === 'all' ? [...ps, ...zeros.filter(finite)] : ps.filter((p) => mag(p) <= NEAR_FACTOR * slowest);
	const R0 = Math.max(0, ...shown.map(mag));
	const R = R0 > 0 ? 1.25 * R0 : 1;
	const maxRe = Math.max(0, ...shown.map((p) => p.re));
	const xMin = -R;
	let xMax = Math.max(0.25 * R, 1.25 * maxRe);
	const hw = Number.isFinite(heightOverWidth) && heightOverWidth > 0 ? heightOverWidth : 0.6;
	let half = ((xMax - xMin) * hw) / 2;
	const needY = 1.15 * Math.max(0, ...shown.map((p) => Math.abs(p.im)));
	let lo = xMin;
	if (needY > half) {
		const k = needY / half;
		lo = xMin * k;
		xMax *= k;
		half = needY;
	}
	return { xMin: lo, xMax, yMin: -half, yMax: half };
}

/** A complex number as text, `a + bj` or `a − bj` (a real number alone when the imaginary part is negligible), with the minus sign U+2212. */
export function formatComplex(p: Complex, sig = 4): string {
	const re = formatSig(p.re, sig).replace('-', '−');
	if (Math.abs(p.im) <= 1e-12 * Math.max(1, Math.abs(p.re))) return re;
	const im = formatSig(Math.abs(p.im), sig);
	return `${re} ${p.im < 0 ? '−' : '+'} ${im}j`;
}

/**
 * The poles as a list for reading, slowest first, with each complex pair written once as
 * `a ± bj`; at most `limit` entries (the rest counted).
 */
export function poleList(poles: readonly Complex[], limit = 8): { items: string[]; more: number } {
	const seen: Complex[] = [];
	for (const p of poles) {
		if (!(Number.isFinite(p.re) && Number.isFinite(p.im))) continue;
		if (p.im < 0 && poles.some((q) => q !== p && Math.abs(q.re - p.re) <= 1e-9 * Math.max(1, Math.abs(p.re)) && Math.abs(q.im + p.im) <= 1e-9 * Math.max(1, Math.abs(p.im)))) continue;
		seen.push(p);
	}
	seen.sort((a, b) => Math.hypot(a.re, a.im) - Math.hypot(b.re, b.im));
	const items = seen.slice(0, limit).map((p) => (Math.abs(p.im) > 1e-12 * Math.max(1, Math.abs(p.re)) ? `${formatSig(p.re, 4).replace('-', '−')} ± ${formatSig(Math.abs(p.im), 4)}j` : formatComplex(p)));
	return { items, more: Math.max(0, seen.length - limit) };
}
