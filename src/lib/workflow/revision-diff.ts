/**
 * The comparison of two revisions of a plant model for the history page: parameters side by side
 * with the change in %, the other fields old → new, and the free texts (change summary, review
 * comment, valid range, operating-point note) as a word diff from the `diff` package (Myers'
 * O(ND) difference algorithm, Algorithmica 1, 1986). Pure; relative imports only.
 */
import { diffWords } from 'diff';
import { largeChanges, relativeChange, type LargeChange } from './change-size';
import type { OperatingPoint, SignalSpan, StoredParameters } from './model-values';

/** One revision's values as the comparison needs them (times in s, ωn in rad/s). */
export interface ComparableRevision {
	id: number;
	no: number;
	state: string;
	structure: string;
	parameters: StoredParameters;
	num: number[];
	den: number[];
	delaySeconds: number;
	gain: number | null;
	timeConstantSeconds: number | null;
	timeUnit: 's' | 'min';
	mv: SignalSpan;
	pv: SignalSpan;
	operatingPoint: OperatingPoint;
	provenance: {
		method: string;
		testDate: string | null;
		fitR2: number | null;
		fitRmse: number | null;
		validRange: string | null;
		revalidateBy: string | null;
	};
	changeSummary: string | null;
	reviewComment: string | null;
}

/** One parameter side by side. */
export interface ParameterRow {
	key: 'k' | 'tau' | 'tau2' | 'zeta' | 'wn' | 'theta' | 'gain' | 'timeConstant';
	label: string;
	/** `gain` (PV unit per MV unit), `integrating_gain` (per s), `s`, `rad/s` or `1` (dimensionless). */
	unit: 'gain' | 'integrating_gain' | 's' | 'rad/s' | '1';
	from: number | null;
	to: number | null;
	/** (to − from)/|from| × 100; null when either side is missing or `from` is 0 with `to` ≠ 0. */
	changePercent: number | null;
	/** Why there is no percentage: `added`, `removed`, `from zero`; null otherwise. */
	note: 'added' | 'removed' | 'from zero' | null;
}

/** A non-numeric (or non-parameter) field old → new. */
export interface FieldRow {
	key: string;
	label: string;
	from: string | number | null;
	to: string | number | null;
	changed: boolean;
}

/** A piece of a text diff: unchanged, added or removed. */
export interface TextPart {
	value: string;
	added: boolean;
	removed: boolean;
}

/** A free text of both revisions as a word diff; `changed` false when identical. */
export interface TextDiff {
	key: 'changeSummary' | 'reviewComment' | 'validRange' | 'opNote';
	label: string;
	changed: boolean;
	parts: TextPart[];
}

/** The comparison of revision `from` (older) with `to` (newer). */
export interface RevisionComparison {
	from: { id: number; no: number; state: string; structure: string };
	to: { id: number; no: number; state: string; structure: string };
	parameters: ParameterRow[];
	fields: FieldRow[];
	texts: TextDiff[];
	/** What the large-change rule of the review finds between the two (see `largeChanges`). */
	largeChanges: LargeChange[];
	/** Transfer functions of both, for overlaying the two step responses. */
	plants: { from: { num: number[]; den: number[]; delay: number }; to: { num: number[]; den: number[]; delay: number } };
}

const PARAMETER_LABELS: Record<ParameterRow['key'], string> = {
	k: 'Gain K',
	tau: 'Time constant τ',
	tau2: 'Time constant τ2',
	zeta: 'Damping ratio ζ',
	wn: 'Natural frequency ωn',
	theta: 'Dead time θ',
	gain: 'Listing gain',
	timeConstant: 'Dominant time constant'
};

function parameterRow(key: ParameterRow['key'], unit: ParameterRow['unit'], from: number | null | undefined, to: number | null | undefined, label = PARAMETER_LABELS[key]): ParameterRow {
	const a = typeof from === 'number' && Number.isFinite(from) ? from : null;
	const b = typeof to === 'number' && Number.isFinite(to) ? to : null;
	let changePercent: number | null = null;
	let note: ParameterRow['note'] = null;
	if (a === null && b !== null) note = 'added';
	else if (a !== null && b === null) note = 'removed';
	else if (a !== null && b !== null) {
		const r = relativeChange(a, b);
		if (r === null) note = 'from zero';
		else changePercent = r * 100;
	}
	return { key, label, unit, from: a, to: b, changePercent, note };
}

function text(key: TextDiff['key'], label: string, from: string | null, to: string | null): TextDiff {
	const a = from ?? '';
	const b = to ?? '';
	const parts = diffWords(a, b).map((c) => ({ value: c.value, added: Boolean(c.added), removed: Boolean(c.removed) }));
	return { key, label, changed: a !== b, parts };
}

function field(key: string, label: string, from: string | number | null, to: string | number | null): FieldRow {
	return { key, label, from, to, changed: from !== to };
}

const coeffText = (a: number[]) => `[${a.join(', ')}]`;

/** Compares two revisions of the same model: parameters with % change, other fields, text diffs. */
export function compareRevisions(from: ComparableRevision, to: ComparableRevision): RevisionComparison {
	const pa = from.parameters;
	const pb = to.parameters;
	const integrating = from.structure === 'ipdt' || to.structure === 'ipdt';
	const keys = ['k', 'tau', 'tau2', 'zeta', 'wn', 'theta'] as const;
	const parameters: ParameterRow[] = [];
	for (const key of keys) {
		const a = key === 'theta' ? from.delaySeconds : pa[key];
		const b = key === 'theta' ? to.delaySeconds : pb[key];
		if ((a === undefined || a === null) && (b === undefined || b === null)) continue;
		const unit: ParameterRow['unit'] =
			key === 'k' ? (integrating ? 'integrating_gain' : 'gain') : key === 'zeta' ? '1' : key === 'wn' ? 'rad/s' : 's';
		parameters.push(parameterRow(key, unit, a, b, key === 'k' && integrating ? 'Integrating gain Kv' : undefined));
	}
	if (from.structure === 'rational' || to.structure === 'rational') {
		parameters.push(parameterRow('gain', integrating ? 'integrating_gain' : 'gain', from.gain, to.gain));
		parameters.push(parameterRow('timeConstant', 's', from.timeConstantSeconds, to.timeConstantSeconds));
	}

	const fields: FieldRow[] = [
		field('structure', 'Structure', from.structure, to.structure),
		field('num', 'Numerator', coeffText(from.num), coeffText(to.num)),
		field('den', 'Denominator', coeffText(from.den), coeffText(to.den)),
		field('timeUnit', 'Time unit', from.timeUnit, to.timeUnit),
		field('mvName', 'MV name', from.mv.name, to.mv.name),
		field('mvUnit', 'MV unit', from.mv.unit, to.mv.unit),
		field('mvMin', 'MV span minimum', from.mv.min, to.mv.min),
		field('mvMax', 'MV span maximum', from.mv.max, to.mv.max),
		field('pvName', 'PV name', from.pv.name, to.pv.name),
		field('pvUnit', 'PV unit', from.pv.unit, to.pv.unit),
		field('pvMin', 'PV span minimum', from.pv.min, to.pv.min),
		field('pvMax', 'PV span maximum', from.pv.max, to.pv.max),
		field('opMv', 'Operating point MV', from.operatingPoint.mv, to.operatingPoint.mv),
		field('opPv', 'Operating point PV', from.operatingPoint.pv, to.operatingPoint.pv),
		field('method', 'Identification method', from.provenance.method, to.provenance.method),
		field('testDate', 'Test date', from.provenance.testDate, to.provenance.testDate),
		field('fitR2', 'Fit R²', from.provenance.fitR2, to.provenance.fitR2),
		field('fitRmse', 'Fit RMS error', from.provenance.fitRmse, to.provenance.fitRmse),
		field('revalidateBy', 'Revalidate by', from.provenance.revalidateBy, to.provenance.revalidateBy)
	];

	const texts: TextDiff[] = [
		text('changeSummary', 'Change summary', from.changeSummary, to.changeSummary),
		text('reviewComment', 'Review comment', from.reviewComment, to.reviewComment),
		text('validRange', 'Valid operating range', from.provenance.validRange, to.provenance.validRange),
		text('opNote', 'Operating point note', from.operatingPoint.note, to.operatingPoint.note)
	];

	const snapshot = (r: ComparableRevision) => ({
		structure: r.structure,
		parameters: r.parameters,
		gain: r.gain,
		timeConstantSeconds: r.timeConstantSeconds,
		delaySeconds: r.delaySeconds
	});

	return {
		from: { id: from.id, no: from.no, state: from.state, structure: from.structure },
		to: { id: to.id, no: to.no, state: to.state, structure: to.structure },
		parameters,
		fields,
		texts,
		largeChanges: largeChanges(snapshot(from), snapshot(to)),
		plants: {
			from: { num: [...from.num], den: [...from.den], delay: from.delaySeconds },
			to: { num: [...to.num], den: [...to.den], delay: to.delaySeconds }
		}
	};
}
