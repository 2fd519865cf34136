/**
 * Shared types of the control-analysis engine. Pure TypeScript: no DOM, no server code,
 * relative imports only, so the engine runs in Node, the browser and a web worker.
 * Time is in seconds and frequency in rad/s throughout the engine.
 */

/** A complex number. */
export interface Complex {
	re: number;
	im: number;
}

/**
 * A SISO transfer function num(s)/den(s)·e^(−delay·s); coefficients in descending powers of s,
 * delay in seconds (0 when absent).
 */
export interface TransferFunction {
	num: number[];
	den: number[];
	delay: number;
}

export type ControllerType = 'P' | 'PI' | 'PD' | 'PID';
export type ControllerForm = 'ideal' | 'series' | 'parallel';

/**
 * Controller settings as entered. Ideal/ISA: kp·(1 + 1/(ti·s) + td·s/(1 + td·s/n)).
 * Series: kp·(1 + 1/(ti·s))·(1 + td·s/(1 + td·s/n)). Parallel: kp + ki/s + kd·s/(1 + (kd/kp)/n·s).
 * ti, td in seconds; ki in 1/s (gain units), kd in s (gain units); n dimensionless; absent n = ideal derivative.
 * b and c are set-point weights on the proportional and derivative terms (default 1 and 0 — common practice).
 */
export interface ControllerSettings {
	type: ControllerType;
	form?: ControllerForm;
	kp: number;
	ti?: number | null;
	td?: number | null;
	n?: number | null;
	ki?: number | null;
	kd?: number | null;
	b?: number | null;
	c?: number | null;
}
