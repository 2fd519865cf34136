/**
 * uPlot options of the bench's charts: time responses (PV, set-point, MV on a second axis,
 * robustness band, comparison sets), Bode magnitude and phase on a log frequency axis with
 * crossover markers, and the pole map (scatter mode) with sweep trails. Axis text and grid take
 * the page theme's colours; lines the colour-blind-safe palette, each with its own dash pattern.
 * Marker positions are read from a mutable `marks` object at draw time, so new results need only
 * `setData`, never a new chart.
 */
import uPlot from 'uplot';
import { formatSig, MISSING } from '../format';
import type { ChartPalette } from './palette';

const MONO = '"IBM Plex Mono", ui-monospace, monospace';
const SANS = '"Inter Variable", system-ui, sans-serif';

/** Legend/readout value: 4 significant digits, the dash for no value. */
const readout = (_u: uPlot, v: number | null) => (v === null || v === undefined || !Number.isFinite(v) ? MISSING : formatSig(v, 4));

/** Tick text: plain numbers from 1e-3 to 1e6 (e.g. −2000, 0.05), exponent form outside, minus sign U+2212. */
export function tickLabel(v: number | null): string {
	if (v === null || !Number.isFinite(v)) return '';
	const a = Math.abs(v);
	const text = a !== 0 && (a < 1e-3 || a >= 1e6) ? formatSig(v, 3) : String(Number(v.toPrecision(6)));
	return text.replace('-', '−');
}

function axis(p: ChartPalette, label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis {
	return {
		label,
		stroke: p.tokens.ink2,
		font: `11px ${MONO}`,
		labelFont: `600 11px ${SANS}`,
		labelSize: 22,
		grid: { stroke: p.tokens.line, width: 1 },
		ticks: { stroke: p.tokens.line, width: 1, size: 4 },
		values: (_u, splits) => splits.map((v) => tickLabel(v)),
		...extra
	};
}

/** A comparison trace for the time-response charts. */
export interface CompareLegend {
	label: string;
}

/** A comparison set's traces on the main time grid (per unit step, nulls where not simulated). */
export interface CompareTrace {
	key: string;
	label: string;
	sp: (number | null)[];
	load: (number | null)[];
}

/**
 * Options of a time-response chart: x = time in the display unit, `PV` (and optionally the
 * set-point) on the left axis, `MV` on the right axis, an optional PV envelope (two series and a
 * band between them), then the comparison sets' PV.
 */
export function responseOptions(args: {
	width: number;
	height: number;
	palette: ChartPalette;
	timeUnit: string;
	pvLabel: string;
	mvLabel: string;
	withSetpoint: boolean;
	withBand: boolean;
	compare: CompareLegend[];
	syncKey: string;
}): uPlot.Options {
	const p = args.palette;
	const series: uPlot.Series[] = [{ label: `t (${args.timeUnit})`, value: readout }];
	if (args.withSetpoint) series.push({ label: 'Set-point', stroke: p.setpoint, dash: [6, 4], width: 1.25, value: readout, points: { show: false } });
	series.push({ label: 'PV', stroke: p.pv, width: 2, value: readout, points: { show: false } });
	series.push({ label: 'MV', stroke: p.mv, width: 1.5, scale: 'mv', value: readout, points: { show: false } });
	const bands: uPlot.Band[] = [];
	if (args.withBand) {
		const hi = series.length;
		series.push({ label: 'PV envelope, max', stroke: p.band, width: 1, value: readout, points: { show: false } });
		series.push({ label: 'PV envelope, min', stroke: p.band, width: 1, value: readout, points: { show: false } });
		bands.push({ series: [hi, hi + 1], fill: p.band });
	}
	args.compare.forEach((c, i) => {
		const style = p.compare[i % p.compare.length];
		series.push({ label: c.label, stroke: style.stroke, dash: style.dash, width: 1.5, value: readout, points: { show: false } });
	});
	return {
		width: args.width,
		height: args.height,
		series,
		bands,
		scales: { x: { time: false }, y: { auto: true }, mv: { auto: true } },
		axes: [
			axis(p, `Time (${args.timeUnit})`),
			axis(p, args.pvLabel, { scale: 'y' }),
			axis(p, args.mvLabel, { scale: 'mv', side: 1, grid: { show: false } })
		],
		cursor: { sync: { key: args.syncKey }, drag: { x: true, y: false } },
		legend: { live: true }
	};
}

/** Positions of the Bode markers (rad per display time unit), null when absent. */
export interface BodeMarks {
	gainCrossover: number | null;
	phaseCrossover: number | null;
}

function drawMarkers(u: uPlot, p: ChartPalette, marks: BodeMarks, level: number | null, levelLabel: string) {
	const ctx = u.ctx;
	const { left, top, width, height } = u.bbox;
	const px = devicePixelRatio || 1;
	ctx.save();
	ctx.beginPath();
	ctx.rect(left, top, width, height);
	ctx.clip();
	ctx.lineWidth = 1 * px;
	ctx.font = `${10 * px}px ${MONO}`;
	if (level !== null) {
		const y = u.valToPos(level, 'y', true);
		if (Number.isFinite(y)) {
			ctx.strokeStyle = p.tokens.ink3;
			ctx.setLineDash([2 * px, 3 * px]);
			ctx.beginPath();
			ctx.moveTo(left, y);
			ctx.lineTo(left + width, y);
			ctx.stroke();
			ctx.fillStyle = p.tokens.ink3;
			ctx.fillText(levelLabel, left + 4 * px, y - 3 * px);
		}
	}
	const vline = (w: number | null, text: string, color: string, dash: number[]) => {
		if (w === null || !(w > 0)) return;
		const x = u.valToPos(w, 'x', true);
		if (!Number.isFinite(x) || x < left || x > left + width) return;
		ctx.strokeStyle = color;
		ctx.setLineDash(dash.map((d) => d * px));
		ctx.beginPath();
		ctx.moveTo(x, top);
		ctx.lineTo(x, top + height);
		ctx.stroke();
		ctx.fillStyle = color;
		ctx.fillText(text, x + 3 * px, top + 11 * px);
	};
	vline(marks.gainCrossover, 'ωgc', p.marker, [5, 3]);
	vline(marks.phaseCrossover, 'ωpc', p.mv, [1, 3]);
	ctx.restore();
}

/** Options of one Bode chart (magnitude in dB or phase in degrees) on a log frequency axis. */
export function bodeOptions(args: {
	width: number;
	height: number;
	palette: ChartPalette;
	timeUnit: string;
	which: 'magnitude' | 'phase';
	marks: BodeMarks;
	syncKey: string;
}): uPlot.Options {
	const p = args.palette;
	const mag = args.which === 'magnitude';
	return {
		width: args.width,
		height: args.height,
		series: [
			{ label: `ω (rad/${args.timeUnit})`, value: readout },
			{ label: mag ? '|L(jω)| dB' : '∠L(jω) °', stroke: p.pv, width: 2, value: readout, points: { show: false } }
		],
		scales: { x: { time: false, distr: 3 }, y: { auto: true } },
		axes: [
			axis(p, mag ? '' : `Frequency (rad/${args.timeUnit}, log)`, mag ? { labelSize: 4, size: 28 } : {}),
			axis(p, mag ? 'Magnitude (dB)' : 'Phase (°)')
		],
		cursor: { sync: { key: args.syncKey }, drag: { x: true, y: false } },
		legend: { live: true },
		hooks: { draw: [(u) => drawMarkers(u, p, args.marks, mag ? 0 : -180, mag ? '0 dB' : '−180°')] }
	};
}

/** The view of the pole map (display units, 1/time), recomputed for each result. */
export interface PoleView {
	xMin: number;
	xMax: number;
	yMin: number;
	yMax: number;
}

/**
 * Options of the pole map: `trails` line series (closed-loop poles as the swept setting moves),
 * then the current poles (filled dots) and the closed-loop zeros (rings). Uses uPlot's scatter
 * mode; the view is read from `view` at draw time. The right half-plane is tinted.
 */
export function poleMapOptions(args: { width: number; height: number; palette: ChartPalette; timeUnit: string; trails: number; view: PoleView }): uPlot.Options {
	const p = args.palette;
	const xy: uPlot.Series.Facet[] = [
		{ scale: 'x', auto: true },
		{ scale: 'y', auto: true }
	];
	const series: uPlot.Series[] = [{}];
	for (let i = 0; i < args.trails; i++) {
		series.push({ label: 'Sweep trail', facets: xy, stroke: p.trail, width: 1.25, points: { show: false } });
	}
	// In scatter mode the markers are the series' own paths (uPlot's point builder with the
	// series' index range); the secondary point layer is off.
	const dots = uPlot.paths.points ? uPlot.paths.points() : undefined;
	series.push({ label: 'Closed-loop poles', facets: xy, stroke: p.pole, fill: p.pole, width: 1, paths: dots, points: { show: false, size: 9, width: 1 } });
	series.push({ label: 'Closed-loop zeros', facets: xy, stroke: p.zero, fill: p.tokens.panel, width: 2, paths: dots, points: { show: false, size: 10, width: 2 } });
	const tint = (u: uPlot) => {
		const ctx = u.ctx;
		const { left, top, width, height } = u.bbox;
		const x0 = u.valToPos(0, 'x', true);
		ctx.save();
		if (Number.isFinite(x0) && x0 < left + width) {
			const from = Math.max(left, x0);
			ctx.fillStyle = p.unstableFill;
			ctx.fillRect(from, top, left + width - from, height);
			ctx.strokeStyle = p.tokens.ink3;
			ctx.lineWidth = 1;
			ctx.beginPath();
			ctx.moveTo(x0, top);
			ctx.lineTo(x0, top + height);
			ctx.stroke();
		}
		ctx.restore();
	};
	return {
		mode: 2,
		width: args.width,
		height: args.height,
		series,
		scales: {
			x: { time: false, auto: true, range: () => [args.view.xMin, args.view.xMax] },
			y: { auto: true, range: () => [args.view.yMin, args.view.yMax] }
		},
		axes: [axis(p, `Real part (1/${args.timeUnit})`), axis(p, `Imaginary part (1/${args.timeUnit})`)],
		cursor: { drag: { x: false, y: false }, points: { show: false } },
		legend: { show: false },
		hooks: { drawClear: [tint] }
	};
}

/**
 * How many leading Bode points to draw: up to 20 times the highest crossover frequency (gain or
 * phase), where the loop's behaviour is decided; beyond it a dead time only winds the phase down
 * by ω·θ and would squash the interesting part of the phase axis. All points when there is no
 * crossover. `w` ascending (rad/s), crossovers in the same unit.
 */
export function bodeWindow(w: ArrayLike<number>, gainCrossover: number | null, phaseCrossover: number | null): number {
	const top = Math.max(gainCrossover ?? 0, phaseCrossover ?? 0);
	if (!(top > 0)) return w.length;
	const limit = 20 * top;
	let n = 0;
	while (n < w.length && w[n] <= limit) n++;
	return Math.max(Math.min(w.length, 2), n);
}
