/**
 * Closed-loop pole trails as one controller parameter varies (root-locus style), for the pole
 * map. Dead time enters through its Padé approximant (order `padeOrder`, default 5).
 */
import type { Complex, ControllerSettings, TransferFunction } from './types';
import { closedLoopPolynomials, DEFAULT_PADE_ORDER } from './closed-loop';
import { controllerTerms } from './controller';
import { AnalysisInputError } from './errors';
import { roots } from './roots';

/** Which parameter to vary over [from, to] with `count` values on a log or linear scale. */
export interface SweepSpec {
	parameter: 'kp' | 'ti' | 'td' | 'ki' | 'kd';
	from: number;
	to: number;
	count?: number;
	scale?: 'log' | 'linear';
}

/** Pole trails: trails[i][k] is pole i at values[k]; `current` are the poles of the given settings. */
export interface SweepResult {
	parameter: SweepSpec['parameter'];
	values: number[];
	trails: Complex[][];
	current: Complex[];
	skipped: { value: number; reason: string }[];
	approximation: 'exact' | 'pade';
}

/**
 * Closed-loop poles of plant + controller with `spec.parameter` set to each sweep value; poles are
 * linked into trails by nearest-neighbour matching from one value to the next. Parameters must
 * suit the form (kp, ti, td for ideal/series; kp, ki, kd for parallel). Values that make the
 * controller invalid (e.g. td = 0 changing the order) are skipped with the reason.
 */
export function sweepPoles(plant: TransferFunction, controller: ControllerSettings, spec: SweepSpec, padeOrder = DEFAULT_PADE_ORDER): SweepResult {
	const form = controller.form ?? 'ideal';
	const allowed = form === 'parallel' ? ['kp', 'ki', 'kd'] : ['kp', 'ti', 'td'];
	if (!allowed.includes(spec.parameter))
		throw new AnalysisInputError('sweep.parameter', `With the ${form} form the sweep parameter must be one of ${allowed.join(', ')}.`);
	const needs: Record<string, string[]> = { ti: ['PI', 'PID'], ki: ['PI', 'PID'], td: ['PD', 'PID'], kd: ['PD', 'PID'], kp: ['P', 'PI', 'PD', 'PID'] };
	if (!needs[spec.parameter].includes(controller.type))
		throw new AnalysisInputError('sweep.parameter', `A ${controller.type} controller has no ${spec.parameter}.`);
	const count = Math.floor(spec.count ?? 41);
	if (!(count >= 2 && count <= 1000)) throw new AnalysisInputError('sweep.count', 'The sweep needs between 2 and 1000 values.');
	const scale = spec.scale ?? 'log';
	const ok = (v: number) => Number.isFinite(v) && (scale === 'linear' || v > 0);
	if (!ok(spec.from)) throw new AnalysisInputError('sweep.from', scale === 'log' ? 'A log sweep needs a finite start > 0.' : 'The start must be finite.');
	if (!ok(spec.to)) throw new AnalysisInputError('sweep.to', scale === 'log' ? 'A log sweep needs a finite end > 0.' : 'The end must be finite.');
	const values: number[] = [];
	for (let k = 0; k < count; k++) {
		const s = k / (count - 1);
		values.push(scale === 'log' ? spec.from * Math.pow(spec.to / spec.from, s) : spec.from + (spec.to - spec.from) * s);
	}
	const order = plant.delay > 0 ? padeOrder : 0;
	const polesFor = (settings: ControllerSettings) => roots(closedLoopPolynomials(plant, controllerTerms(settings), order).char);
	const current = polesFor(controller);
	const trails: Complex[][] = [];
	const kept: number[] = [];
	const skipped: { value: number; reason: string }[] = [];
	let prev: Complex[] | null = null;
	for (const v of values) {
		let poles: Complex[];
		try {
			poles = polesFor({ ...controller, [spec.parameter]: v });
		} catch (e) {
			if (e instanceof AnalysisInputError) {
				skipped.push({ value: v, reason: e.message });
				continue;
			}
			throw e;
		}
		if (prev && poles.length !== prev.length) {
			skipped.push({ value: v, reason: 'The number of closed-loop poles changes at this value.' });
			continue;
		}
		if (!prev) {
			for (const p of poles) trails.push([p]);
		} else {
			// Greedy nearest matching of the new poles to the trail ends.
			const left = poles.slice();
			const pairs: { i: number; j: number; d: number }[] = [];
			for (let i = 0; i < prev.length; i++) for (let j = 0; j < left.length; j++) pairs.push({ i, j, d: Math.hypot(prev[i].re - left[j].re, prev[i].im - left[j].im) });
			pairs.sort((a, b) => a.d - b.d);
			const usedI = new Set<number>();
			const usedJ = new Set<number>();
			const assigned: Complex[] = new Array(prev.length);
			for (const p of pairs) {
				if (usedI.has(p.i) || usedJ.has(p.j)) continue;
				usedI.add(p.i);
				usedJ.add(p.j);
				assigned[p.i] = left[p.j];
			}
			for (let i = 0; i < prev.length; i++) trails[i].push(assigned[i]);
			poles = assigned;
		}
		prev = poles;
		kept.push(v);
	}
	return { parameter: spec.parameter, values: kept, trails, current, skipped, approximation: plant.delay > 0 ? 'pade' : 'exact' };
}
