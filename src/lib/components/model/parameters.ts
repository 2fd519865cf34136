/**
 * The rows of a model's parameter table: symbol (TeX), meaning in words, value and unit, in the
 * model's display time unit (with the value in seconds alongside when that is minutes). Pure; the
 * page renders the symbols with KaTeX on the server.
 */
import {
	formatSig,
	gainUnit,
	gainValue,
	MISSING,
	secondsTo,
	type StructureParameters,
	type TimeUnit
} from '../../format';

export interface ParameterRow {
	key: string;
	symbolTex: string;
	name: string;
	value: string;
	unit: string;
	/** The same value in seconds (or rad/s), when the display unit is minutes. */
	alt?: string;
}

interface RevisionLike {
	structure: string;
	parameters: StructureParameters;
	gain: number | null;
	/** Denominator coefficients, descending powers of s (a trailing 0 is a pole at s = 0). */
	den?: readonly number[];
	delaySeconds: number;
	timeUnit: TimeUnit;
	mv: { unit: string };
	pv: { unit: string };
}

const SIG = 4;
const ok = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

function timeRow(key: string, symbolTex: string, name: string, seconds: number, unit: TimeUnit): ParameterRow {
	const v = secondsTo(seconds, unit);
	return {
		key,
		symbolTex,
		name,
		value: formatSig(v, SIG),
		unit,
		...(unit === 'min' ? { alt: `${formatSig(seconds, SIG)} s` } : {})
	};
}

/** Natural frequency in rad per display unit (rad/min = rad/s × 60). */
function frequencyRow(wnRadPerSec: number, unit: TimeUnit): ParameterRow {
	const v = unit === 'min' ? wnRadPerSec * 60 : wnRadPerSec;
	return {
		key: 'wn',
		symbolTex: '\\omega_n',
		name: 'Natural frequency',
		value: formatSig(v, SIG),
		unit: `rad/${unit}`,
		...(unit === 'min' ? { alt: `${formatSig(wnRadPerSec, SIG)} rad/s` } : {})
	};
}

/** The gain of a model with a free integrator: a rate, stored per second, shown per display unit. */
function integratingGainRow(perSecond: number | null, r: RevisionLike, u: TimeUnit): ParameterRow {
	return {
		key: 'k',
		symbolTex: 'K_v',
		name: 'Integrating gain (rate of PV per MV)',
		value: formatSig(gainValue(perSecond, u), SIG),
		unit: gainUnit(r.pv.unit, r.mv.unit, u),
		...(u === 'min' ? { alt: `${formatSig(perSecond, SIG)} per s` } : {})
	};
}

/** Parameter rows for the structure of `r`; the dead time is always listed. */
export function parameterRows(r: RevisionLike): ParameterRow[] {
	const p = r.parameters ?? {};
	const u = r.timeUnit;
	const gain: ParameterRow = {
		key: 'k',
		symbolTex: 'K',
		name: 'Process gain',
		value: formatSig(ok(p.k) ? p.k : r.gain, SIG),
		unit: gainUnit(r.pv.unit, r.mv.unit)
	};
	const rows: ParameterRow[] = [];
	switch (r.structure) {
		case 'fopdt':
			rows.push(gain);
			if (ok(p.tau)) rows.push(timeRow('tau', '\\tau', 'Time constant', p.tau, u));
			break;
		case 'sopdt':
			rows.push(gain);
			if (ok(p.tau2)) {
				if (ok(p.tau)) rows.push(timeRow('tau', '\\tau_1', 'Slower time constant', p.tau, u));
				rows.push(timeRow('tau2', '\\tau_2', 'Faster time constant', p.tau2, u));
			} else {
				if (ok(p.wn)) rows.push(frequencyRow(p.wn, u));
				else if (ok(p.tau)) rows.push(timeRow('tau', '\\tau', 'Characteristic time (1/ω_n)', p.tau, u));
				if (ok(p.zeta)) rows.push({ key: 'zeta', symbolTex: '\\zeta', name: 'Damping ratio', value: formatSig(p.zeta, SIG), unit: '' });
			}
			break;
		case 'ipdt':
			rows.push(integratingGainRow(ok(p.k) ? p.k : r.gain, r, u));
			break;
		case 'second_order':
			rows.push(gain);
			if (ok(p.wn)) rows.push(frequencyRow(p.wn, u));
			if (ok(p.zeta)) rows.push({ key: 'zeta', symbolTex: '\\zeta', name: 'Damping ratio', value: formatSig(p.zeta, SIG), unit: '' });
			break;
		default: {
			const den = r.den ?? [];
			const integrating = den.length > 1 && den[den.length - 1] === 0;
			if (ok(r.gain)) rows.push(integrating ? integratingGainRow(r.gain, r, u) : { ...gain, name: 'Steady-state gain', value: formatSig(r.gain, SIG) });
		}
	}
	const theta = ok(p.theta) ? p.theta : r.delaySeconds;
	if (r.structure !== 'second_order' || theta > 0) rows.push(timeRow('theta', '\\theta', 'Dead time', theta, u));
	return rows.map((row) => (row.value === MISSING ? { ...row, unit: '' } : row));
}
