/**
 * Formatting for the review pages: a signed change in percent, the waiting time of a queue line,
 * and a parameter of a revision comparison in the revision's display units (times in s or min,
 * ωn in rad per that unit, an integrating gain per that unit). Pure; no DOM, no server code.
 */
import { formatSig, gainUnit, gainValue, MISSING, type TimeUnit } from '../../format';

/** A signed change in percent with a typographic minus: "+12 %", "−35 %", "+4.5 %" (one decimal below 10 %). */
export function percentWords(p: number | null | undefined): string {
	if (p === null || p === undefined || !Number.isFinite(p)) return MISSING;
	const a = Math.abs(p);
	const text = a < 10 ? (Math.round(a * 10) / 10).toString() : Math.round(a).toString();
	if (text === '0') return '0 %';
	return `${p > 0 ? '+' : '−'}${text} %`;
}

/** How long a line has waited, from whole days: "today", "1 day", "12 days". */
export function waitingWords(days: number): string {
	if (!(days > 0)) return 'today';
	return days === 1 ? '1 day' : `${days} days`;
}

/** Units of a comparison parameter: `gain`, `integrating_gain` (per s), `s`, `rad/s`, `1`. */
export type ParameterUnit = 'gain' | 'integrating_gain' | 's' | 'rad/s' | '1';

/** The value of a comparison parameter (stored in s-based units) in the display unit, or null. */
export function parameterValue(value: number | null, unit: ParameterUnit, timeUnit: TimeUnit): number | null {
	if (value === null || !Number.isFinite(value)) return null;
	const perUnit = timeUnit === 'min' ? 60 : 1;
	switch (unit) {
		case 's':
			return value / perUnit;
		case 'rad/s':
			return value * perUnit;
		case 'integrating_gain':
			return gainValue(value, timeUnit);
		default:
			return value;
	}
}

/** The unit text of a comparison parameter in the display unit, e.g. `°C/%`, `min`, `rad/min`, `` for ζ. */
export function parameterUnitText(unit: ParameterUnit, timeUnit: TimeUnit, pvUnit: string, mvUnit: string): string {
	switch (unit) {
		case 's':
			return timeUnit;
		case 'rad/s':
			return `rad/${timeUnit}`;
		case 'gain':
			return gainUnit(pvUnit, mvUnit);
		case 'integrating_gain':
			return gainUnit(pvUnit, mvUnit, timeUnit);
		default:
			return '';
	}
}

/** A comparison parameter as text with 4 significant digits (no unit). */
export function parameterText(value: number | null, unit: ParameterUnit, timeUnit: TimeUnit): string {
	return formatSig(parameterValue(value, unit, timeUnit), 4);
}
