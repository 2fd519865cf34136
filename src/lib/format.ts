/**
 * Formatting of values for display: significant digits, times in s or min, gains with their
 * engineering units, dates, and the plain-word labels of the domain's enumerations. Pure
 * functions with no DOM and no server code, shared by server `load`s and components.
 * Everything returns a string; missing or non-finite input gives the dash `—`, never "NaN".
 */

/** The dash shown for a value that is absent or not a finite number. */
export const MISSING = '—';

export type TimeUnit = 's' | 'min';

/** Seconds per minute (SI: 1 min = 60 s). */
const SECONDS_PER_MINUTE = 60;

/**
 * A number rounded to `sig` significant digits, written like C's `printf("%.*g")` (ISO C99
 * 7.19.6.1, the `g` conversion; Python's `format(x, '.4g')` follows it): trailing zeros dropped,
 * exponent notation (`1.5e+05`, `2e-05`) when the decimal exponent is below −4 or at least `sig`.
 * `-0` prints as `0`. Null, undefined, NaN and ±Infinity give `—`.
 */
export function formatSig(value: number | null | undefined, sig = 4): string {
	if (value === null || value === undefined || !Number.isFinite(value)) return MISSING;
	const p = Math.min(Math.max(Math.trunc(sig), 1), 17);
	if (value === 0) return '0';
	const expForm = value.toExponential(p - 1); // e.g. "1.235e+4" — rounding decides the exponent
	const exponent = Number(expForm.slice(expForm.indexOf('e') + 1));
	if (exponent < -4 || exponent >= p) {
		const [mantissa, exp] = expForm.split('e');
		const sign = exp.startsWith('-') ? '-' : '+';
		const digits = exp.replace(/^[+-]/, '').padStart(2, '0');
		return `${stripZeros(mantissa)}e${sign}${digits}`;
	}
	return stripZeros(value.toFixed(Math.max(p - 1 - exponent, 0)));
}

function stripZeros(s: string): string {
	if (!s.includes('.')) return s === '-0' ? '0' : s;
	const out = s.replace(/0+$/, '').replace(/\.$/, '');
	return out === '-0' ? '0' : out;
}

/** Seconds expressed in `unit` (min = s / 60). Null for absent or non-finite input. */
export function secondsTo(seconds: number | null | undefined, unit: TimeUnit): number | null {
	if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return null;
	return unit === 'min' ? seconds / SECONDS_PER_MINUTE : seconds;
}

/** A time given in seconds, shown in `unit` with `sig` significant digits and the unit, e.g. `7.5 min`. */
export function formatDuration(seconds: number | null | undefined, unit: TimeUnit, sig = 4): string {
	const v = secondsTo(seconds, unit);
	return v === null ? MISSING : `${formatSig(v, sig)} ${unit}`;
}

/** Wraps a compound unit (`m³/h`, `kg/s`) in brackets so it can sit in a quotient unambiguously. */
function unitTerm(unit: string): string {
	const u = unit.trim();
	return /[/·*\s]/.test(u) ? `(${u})` : u;
}

/**
 * The unit of a process gain ΔPV/ΔMV, e.g. `°C/%`, `(m³/h)/%`. For an integrating process the gain is
 * a rate, ΔPV per time per ΔMV, e.g. `%/(%·min)`, in the model's display time unit.
 */
export function gainUnit(pvUnit: string, mvUnit: string, integratingIn?: TimeUnit): string {
	const pv = unitTerm(pvUnit);
	if (integratingIn) return `${pv}/(${mvUnit.trim()}·${integratingIn})`;
	return `${pv}/${unitTerm(mvUnit)}`;
}

/**
 * The process gain as displayed. A static gain is shown as stored; an integrating gain (stored per
 * second) is scaled to the display time unit (per minute = per second × 60).
 */
export function gainValue(gain: number | null | undefined, integratingIn?: TimeUnit): number | null {
	if (gain === null || gain === undefined || !Number.isFinite(gain)) return null;
	return integratingIn === 'min' ? gain * SECONDS_PER_MINUTE : gain;
}

/** A date (`YYYY-MM-DD` or a Date) as an ISO calendar date, unambiguous across locales. */
export function formatDate(value: string | Date | null | undefined): string {
	if (value === null || value === undefined || value === '') return MISSING;
	if (typeof value === 'string') return /^\d{4}-\d{2}-\d{2}/.test(value) ? value.slice(0, 10) : MISSING;
	if (Number.isNaN(value.getTime())) return MISSING;
	return value.toISOString().slice(0, 10);
}

/** A timestamp as `YYYY-MM-DD HH:MM UTC`. */
export function formatDateTime(value: string | Date | null | undefined): string {
	if (value === null || value === undefined || value === '') return MISSING;
	const d = typeof value === 'string' ? new Date(value) : value;
	if (Number.isNaN(d.getTime())) return MISSING;
	return `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** Today's calendar date in UTC as `YYYY-MM-DD`. */
export function todayUtc(now: Date = new Date()): string {
	return now.toISOString().slice(0, 10);
}

/** Whole days from `from` to `to`, both `YYYY-MM-DD` (UTC calendar days). */
export function daysBetween(from: string, to: string): number {
	const a = Date.UTC(+from.slice(0, 4), +from.slice(5, 7) - 1, +from.slice(8, 10));
	const b = Date.UTC(+to.slice(0, 4), +to.slice(5, 7) - 1, +to.slice(8, 10));
	return Math.round((b - a) / 86_400_000);
}

export type Revalidation =
	| { status: 'none' }
	| { status: 'ok'; daysLeft: number }
	| { status: 'due_soon'; daysLeft: number }
	| { status: 'overdue'; daysOver: number };

/** Days before a revalidate-by date from which the register warns that it is coming up. */
export const DUE_SOON_DAYS = 30;

/**
 * Where a model stands against its revalidate-by date on `today`: overdue (stale) once the date
 * has passed, due soon within `DUE_SOON_DAYS`, otherwise ok; `none` when no date is set.
 */
export function revalidation(revalidateBy: string | null | undefined, today: string): Revalidation {
	if (!revalidateBy) return { status: 'none' };
	const left = daysBetween(today, revalidateBy);
	if (left < 0) return { status: 'overdue', daysOver: -left };
	if (left <= DUE_SOON_DAYS) return { status: 'due_soon', daysLeft: left };
	return { status: 'ok', daysLeft: left };
}

// ── Labels in plain words ────────────────────────────────────────────────────────────────────

export type StructureCode = 'fopdt' | 'sopdt' | 'ipdt' | 'second_order' | 'rational';

/** Plain-word names of the model structures (PRODUCT.md "Domain"). */
export const STRUCTURE_LABELS: Record<StructureCode, string> = {
	fopdt: 'First order + dead time',
	sopdt: 'Second order + dead time',
	ipdt: 'Integrating + dead time',
	second_order: 'Standard second order',
	rational: 'Rational transfer function'
};

/** Short codes of the structures, for narrow columns. */
export const STRUCTURE_SHORT: Record<StructureCode, string> = {
	fopdt: 'FOPDT',
	sopdt: 'SOPDT',
	ipdt: 'IPDT',
	second_order: '2nd order',
	rational: 'Rational'
};

/**
 * The structure in plain words; an SOPDT is called underdamped when its damping ratio is below 1
 * and overdamped otherwise (standard second-order terminology, e.g. Ogata, Modern Control
 * Engineering, 5th ed., 2010, §5-3).
 */
export function structureLabel(structure: string, params?: { zeta?: number | null } | null): string {
	const base = STRUCTURE_LABELS[structure as StructureCode] ?? structure;
	if (structure === 'sopdt') {
		const z = params?.zeta;
		if (typeof z === 'number' && Number.isFinite(z) && z < 1) return `${base}, underdamped`;
		return `${base}, overdamped`;
	}
	return base;
}

/** Plain-word names of the asset kinds. */
export const ASSET_KIND_LABELS: Record<string, string> = {
	pump: 'Pump',
	oven: 'Oven',
	heat_exchanger: 'Heat exchanger',
	tank: 'Tank',
	chiller: 'Chiller',
	dryer: 'Dryer',
	fan: 'Fan',
	conveyor: 'Conveyor',
	boiler: 'Boiler',
	valve: 'Valve',
	other: 'Other'
};

/** Plain-word names of the identification methods. */
export const METHOD_LABELS: Record<string, string> = {
	step_test: 'Step test',
	two_point: 'Two-point method',
	least_squares: 'Least-squares fit',
	datasheet: 'From datasheet',
	first_principles: 'From first principles'
};

/** Plain-word names of revision (and tuning-set) states. */
export const REVISION_STATE_LABELS: Record<string, string> = {
	draft: 'Draft',
	in_review: 'In review',
	changes_requested: 'Changes requested',
	approved: 'Approved',
	superseded: 'Superseded',
	withdrawn: 'Withdrawn'
};

/** Plain-word names of controller forms. */
export const CONTROLLER_FORM_LABELS: Record<string, string> = {
	ideal: 'Ideal (ISA standard)',
	series: 'Series (interacting)',
	parallel: 'Parallel (independent)'
};

/** A label from one of the tables above, or the raw code when unknown. */
export function label(table: Record<string, string>, code: string | null | undefined): string {
	if (!code) return MISSING;
	return table[code] ?? code;
}

// ── Transfer functions as TeX ────────────────────────────────────────────────────────────────

/** Structure parameters as stored: times in seconds, ωn in rad/s, an integrating gain per second. */
export interface StructureParameters {
	k?: number | null;
	tau?: number | null;
	tau2?: number | null;
	zeta?: number | null;
	wn?: number | null;
	theta?: number | null;
}

/** A number for TeX with `sig` significant digits; `1.5e+05` becomes `1.5\times10^{5}`. */
export function texNumber(value: number, sig = 4): string {
	const s = formatSig(value, sig);
	const m = /^(-?[0-9.]+)e([+-])0*([0-9]+)$/.exec(s);
	if (!m) return s;
	const exp = `${m[2] === '-' ? '-' : ''}${m[3]}`;
	return m[1] === '1' ? `10^{${exp}}` : `${m[1]}\\times10^{${exp}}`;
}

/**
 * A polynomial with coefficients in descending powers of `v`, as TeX (`2.5\,s^{2} + s - 3`).
 * Zero terms are left out; a unit coefficient is not written except on the constant term.
 */
export function texPolynomial(coefficients: readonly number[], v = 's', sig = 4): string {
	const n = coefficients.length - 1;
	const terms: string[] = [];
	coefficients.forEach((c, i) => {
		if (!Number.isFinite(c) || c === 0) return;
		const power = n - i;
		const mag = Math.abs(c);
		const sign = c < 0 ? '-' : '+';
		const variable = power === 0 ? '' : power === 1 ? v : `${v}^{${power}}`;
		const coef = power > 0 && formatSig(mag, sig) === '1' ? '' : texNumber(mag, sig);
		const body = coef && variable ? `${coef}\\,${variable}` : coef || variable;
		terms.push(terms.length === 0 ? (sign === '-' ? `-${body}` : body) : ` ${sign} ${body}`);
	});
	return terms.length ? terms.join('') : '0';
}

/**
 * Rescales polynomial coefficients (descending powers of s, s in 1/s) to a Laplace variable in
 * 1/`unit`: with s = p/60 for minutes, the coefficient of s^k becomes a_k/60^k (time scaling of the
 * Laplace transform, L{f(t/a)} = a·F(a·s); common practice).
 */
export function rescalePolynomial(coefficients: readonly number[], unit: TimeUnit): number[] {
	if (unit === 's') return [...coefficients];
	const n = coefficients.length - 1;
	return coefficients.map((c, i) => c / SECONDS_PER_MINUTE ** (n - i));
}

function delayTex(thetaSeconds: number | null | undefined, unit: TimeUnit, sig: number): string {
	const th = secondsTo(thetaSeconds ?? 0, unit) ?? 0;
	return th > 0 ? `\\,e^{-${texNumber(th, sig)}\\,s}` : '';
}

function finite(x: number | null | undefined): x is number {
	return typeof x === 'number' && Number.isFinite(x);
}

/** The symbolic form of each structure, as TeX (letters only). */
export function symbolicTransferFunctionTex(structure: string, params?: StructureParameters | null): string {
	switch (structure) {
		case 'fopdt':
			return String.raw`G(s) = \dfrac{K}{\tau s + 1}\,e^{-\theta s}`;
		case 'sopdt':
			if (params && finite(params.zeta) && !finite(params.tau2)) {
				return finite(params.wn)
					? String.raw`G(s) = \dfrac{K\,\omega_n^{2}}{s^{2} + 2\zeta\omega_n s + \omega_n^{2}}\,e^{-\theta s}`
					: String.raw`G(s) = \dfrac{K}{\tau^{2}s^{2} + 2\zeta\tau s + 1}\,e^{-\theta s}`;
			}
			return String.raw`G(s) = \dfrac{K}{(\tau_1 s + 1)(\tau_2 s + 1)}\,e^{-\theta s}`;
		case 'ipdt':
			return String.raw`G(s) = \dfrac{K_v}{s}\,e^{-\theta s}`;
		case 'second_order':
			return String.raw`G(s) = \dfrac{K\,\omega_n^{2}}{s^{2} + 2\zeta\omega_n s + \omega_n^{2}}`;
		default:
			return String.raw`G(s) = \dfrac{b_m s^{m} + \dots + b_0}{a_n s^{n} + \dots + a_0}\,e^{-\theta s}`;
	}
}

/**
 * The model's transfer function with its numbers, as TeX, with times in the display `unit` (the
 * Laplace variable s is then in 1/min for minutes). FOPDT, overdamped SOPDT and IPDT are written
 * in their factored forms from the parameters; every other case from num/den (descending powers
 * of s, rescaled to the unit) and the delay in seconds.
 */
export function numericTransferFunctionTex(
	model: {
		structure: string;
		parameters?: StructureParameters | null;
		num: readonly number[];
		den: readonly number[];
		delaySeconds: number;
	},
	unit: TimeUnit,
	sig = 4
): string {
	const p = model.parameters ?? {};
	const delay = delayTex(model.delaySeconds, unit, sig);
	const t = (x: number) => texNumber(secondsTo(x, unit) as number, sig);
	if (model.structure === 'fopdt' && finite(p.k) && finite(p.tau)) {
		return String.raw`G(s) = \dfrac{${texNumber(p.k, sig)}}{${t(p.tau)}\,s + 1}${delay}`;
	}
	if (model.structure === 'sopdt' && finite(p.k) && finite(p.tau) && finite(p.tau2)) {
		return String.raw`G(s) = \dfrac{${texNumber(p.k, sig)}}{(${t(p.tau)}\,s + 1)(${t(p.tau2)}\,s + 1)}${delay}`;
	}
	if (model.structure === 'ipdt' && finite(p.k)) {
		const kv = gainValue(p.k, unit) as number;
		return String.raw`G(s) = \dfrac{${texNumber(kv, sig)}}{s}${delay}`;
	}
	const num = rescalePolynomial(model.num, unit);
	const den = rescalePolynomial(model.den, unit);
	return String.raw`G(s) = \dfrac{${texPolynomial(num, 's', sig)}}{${texPolynomial(den, 's', sig)}}${delay}`;
}
