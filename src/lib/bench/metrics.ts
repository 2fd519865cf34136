/**
 * The bench's metrics table: which values of the `analyze()` response it shows, in which units,
 * with a one-line meaning and the guide page that defines each. Responses are per unit step;
 * values are scaled here to the bench's set-point step (PV units) and load step (MV units) —
 * the loop is linear — and times to the display unit. A value that does not exist is shown as
 * the dash with the engine's reason, never as NaN.
 */
import type { AnalysisResponse } from '../control';
import { formatSig, MISSING } from '../format';
import type { TimeUnit } from './bench.svelte';

/** One row of the table. */
export interface MetricRow {
	key: string;
	label: string;
	/** One line: what the value means. */
	meaning: string;
	/** Definition page (guide) with its anchor. */
	href: string;
	/** Formatted value, or the dash. */
	value: string;
	unit: string;
	/** Why there is no value (from the engine), or null. */
	reason: string | null;
}

/** A titled group of rows. */
export interface MetricGroup {
	id: string;
	title: string;
	rows: MetricRow[];
}

/** What the table needs besides the response. */
export interface MetricContext {
	timeUnit: TimeUnit;
	/** Set-point step in PV units and load step in MV units. */
	spStep: number;
	loadStep: number;
	pvUnit: string;
	mvUnit: string;
}

/** Guide pages of the metric groups (content/*.md, served at /guide/<slug>). */
export const GUIDE = {
	step: '/guide/step-response',
	load: '/guide/load-response',
	steady: '/guide/steady-state',
	poles: '/guide/dominant-poles',
	margins: '/guide/stability-margins',
	forms: '/guide/controller-forms'
} as const;

const num = (x: number | null | undefined): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** The metric groups for one response. */
export function metricGroups(r: AnalysisResponse, ctx: MetricContext): MetricGroup[] {
	const f = ctx.timeUnit === 'min' ? 60 : 1;
	const u = ctx.timeUnit;
	const rad = `rad/${u}`;
	const why = (path: string, fallback = 'not defined for this loop') => r.reasons[path] ?? fallback;
	const row = (key: string, label: string, meaning: string, href: string, value: number | null, unit: string, reasonPath: string, sig = 4): MetricRow => ({
		key,
		label,
		meaning,
		href,
		value: value === null ? MISSING : formatSig(value, sig),
		unit: value === null ? '' : unit,
		reason: value === null ? why(reasonPath) : null
	});
	const time = (x: number | null | undefined) => (num(x) === null ? null : (x as number) / f);
	const scaled = (x: number | null | undefined, k: number) => (num(x) === null ? null : (x as number) * k);
	const s = r.stepInfo;
	const d = r.disturbance.info;
	const m = r.margins;
	const band = Math.round((s.settlingBand ?? 0.02) * 1000) / 10;
	const stepped = `${formatSig(ctx.spStep, 3)} ${ctx.pvUnit}`;
	const loaded = `${formatSig(ctx.loadStep, 3)} ${ctx.mvUnit}`;
	const ess = num(s.steadyStateError);

	return [
		{
			id: 'setpoint',
			title: `Set-point step of ${stepped}`,
			rows: [
				row('riseTime', 'Rise time', 'Time for the PV to go from 10 % to 90 % of its final change.', `${GUIDE.step}#rise-time`, time(s.riseTime), u, 'stepInfo.riseTime'),
				row('overshoot', 'Overshoot', 'How far the PV passes its final value, in % of the change.', `${GUIDE.step}#overshoot`, num(s.overshootPercent), '%', 'stepInfo.overshootPercent', 3),
				row('peak', 'Peak ΔPV', 'Largest change of the PV after the step.', `${GUIDE.step}#peak`, scaled(s.peak, ctx.spStep), ctx.pvUnit, 'stepInfo.peak'),
				row('peakTime', 'Peak time', 'When the PV reaches its largest change.', `${GUIDE.step}#peak`, time(s.peakTime), u, 'stepInfo.peakTime'),
				row('settling', `Settling time (${band} %)`, `Last time the PV is outside ±${band} % of its final value.`, `${GUIDE.step}#settling-time`, time(s.settlingTime), u, 'stepInfo.settlingTime'),
				row('ess', 'Steady-state error', 'Error left after the response settles, in % of the step (final value theorem).', `${GUIDE.steady}#steady-state-error`, ess === null ? null : ess * 100, '% of step', 'stepInfo.steadyStateError', 3),
				row('iae', 'IAE', 'Integral of the absolute error: the area between set-point and PV.', `${GUIDE.step}#iae`, num(s.iae) === null ? null : ((s.iae as number) * ctx.spStep) / f, `${ctx.pvUnit}·${u}`, 'stepInfo.iae'),
				row('peakMv', 'Peak ΔMV', 'Largest change of the controller output: the actuator effort.', `${GUIDE.step}#peak-mv`, scaled(s.peakMv, ctx.spStep), ctx.mvUnit, 'stepInfo.peakMv')
			]
		},
		{
			id: 'load',
			title: `Load step of ${loaded} at the plant input`,
			rows: [
				row('loadPeak', 'Peak ΔPV', 'Largest deviation of the PV caused by the load step.', `${GUIDE.load}#peak-deviation`, scaled(d.peak, ctx.loadStep), ctx.pvUnit, 'disturbance.info.peak'),
				row('loadPeakTime', 'Peak time', 'When the deviation is largest.', `${GUIDE.load}#peak-deviation`, time(d.peakTime), u, 'disturbance.info.peakTime'),
				row('loadRecovery', `Recovery time (${band} %)`, 'Last time the PV is outside the band around its final value.', `${GUIDE.load}#recovery-time`, time(d.recoveryTime), u, 'disturbance.info.recoveryTime'),
				row('loadIae', 'IAE', 'Area of the PV deviation: how much the load upset the loop in total.', `${GUIDE.load}#iae`, num(d.iae) === null ? null : ((d.iae as number) * ctx.loadStep) / f, `${ctx.pvUnit}·${u}`, 'disturbance.info.iae')
			]
		},
		{
			id: 'poles',
			title: 'Closed-loop poles',
			rows: [
				row('zeta', 'Damping ratio ζ', 'Damping of the dominant complex pole pair: 1 is critical, small values ring.', `${GUIDE.poles}#damping-ratio`, num(r.dominant?.zeta), '', 'dominant', 3),
				row('wn', 'Natural frequency ωn', 'Distance of the dominant pair from the origin: how fast the loop responds.', `${GUIDE.poles}#natural-frequency`, scaled(r.dominant?.wn, f), rad, 'dominant'),
				row('wd', 'Damped frequency ωd', 'Frequency at which the dominant pair rings: ωn·√(1 − ζ²).', `${GUIDE.poles}#natural-frequency`, scaled(r.dominant?.wd, f), rad, 'dominant'),
				row('type', 'Loop type', 'Number of integrators in the loop; type 1 or more removes the step error.', `${GUIDE.steady}#loop-type`, r.errorConstants.systemType, '', 'errorConstants.systemType', 3),
				row('kpos', 'Position constant Kp', 'Loop gain at zero frequency; sets the step error of a type-0 loop.', `${GUIDE.steady}#error-constants`, num(r.errorConstants.kp), '', 'errorConstants.kp'),
				row('kvel', 'Velocity constant Kv', 'Sets the error to a ramp of the set-point in a type-1 loop.', `${GUIDE.steady}#error-constants`, scaled(r.errorConstants.kv, f), `1/${u}`, 'errorConstants.kv')
			]
		},
		{
			id: 'margins',
			title: 'Stability margins',
			rows: [
				row('gm', 'Gain margin', 'Factor by which the loop gain may grow before the loop oscillates.', `${GUIDE.margins}#gain-margin`, num(m.gainMargin), '×', 'margins.gainMargin', 3),
				row('gmDb', 'Gain margin', 'The same margin in decibels.', `${GUIDE.margins}#gain-margin`, num(m.gainMarginDb), 'dB', 'margins.gainMarginDb', 3),
				row('pm', 'Phase margin', 'Extra phase lag the loop tolerates at the gain crossover.', `${GUIDE.margins}#phase-margin`, num(m.phaseMargin), '°', 'margins.phaseMargin', 3),
				row('dm', 'Delay margin', 'Extra dead time the loop tolerates before it oscillates.', `${GUIDE.margins}#delay-margin`, time(m.delayMargin), u, 'margins.delayMargin', 3),
				row('ms', 'Max. sensitivity Ms', 'Peak amplification of disturbances; 1.2–2 is the usual range.', `${GUIDE.margins}#maximum-sensitivity`, num(m.ms), '', 'margins.ms', 3),
				row('wgc', 'Gain crossover ωgc', 'Frequency where the loop gain is 1 (the phase margin is read here).', `${GUIDE.margins}#crossovers`, scaled(m.gainCrossover, f), rad, 'margins.gainCrossover', 3),
				row('wpc', 'Phase crossover ωpc', 'Frequency where the loop phase is −180° (the gain margin is read here).', `${GUIDE.margins}#crossovers`, scaled(m.phaseCrossover, f), rad, 'margins.phaseCrossover', 3)
			]
		}
	];
}
