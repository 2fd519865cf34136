/**
 * One analysis job of the bench, as the web worker runs it (and as the main thread runs it when
 * no worker is available): `analyze(request)` with its computing time, or the error with the
 * request field it concerns. Pure apart from the clock; unit-tested without a worker.
 */
import { analyze, AnalysisInputError, type AnalysisRequest, type AnalysisResponse } from '../control';

/** What the job is for: the live plots, the slower extras (pole trails, robustness), or a comparison set. */
export type JobKind = 'main' | 'extra' | 'compare';

/** A job sent to the worker. */
export interface JobMessage {
	id: number;
	kind: JobKind;
	/** The comparison set's key (kind 'compare'). */
	key?: string;
	request: AnalysisRequest;
}

/**
 * The worker's answer; `computeMs` is the time `analyze` took and `startedAt` when it started
 * (ms since the epoch, performance.timeOrigin + performance.now(), comparable across the page
 * and its workers) — for the bench's input-to-redraw measurement.
 */
export type JobResult =
	| { id: number; kind: JobKind; key?: string; ok: true; response: AnalysisResponse; computeMs: number; startedAt: number }
	| { id: number; kind: JobKind; key?: string; ok: false; field: string; message: string; computeMs: number; startedAt: number };

/** Runs `analyze` on the job's request; input errors come back with their field, other failures with a plain message. */
export function runJob(msg: JobMessage, now: () => number = () => performance.now()): JobResult {
	const t0 = now();
	const head = { id: msg.id, kind: msg.kind, ...(msg.key !== undefined ? { key: msg.key } : {}), startedAt: performance.timeOrigin + t0 };
	try {
		const response = analyze(msg.request);
		return { ...head, ok: true, response, computeMs: now() - t0 };
	} catch (e) {
		if (e instanceof AnalysisInputError) return { ...head, ok: false, field: e.field, message: e.message, computeMs: now() - t0 };
		const message = e instanceof Error ? e.message : String(e);
		return { ...head, ok: false, field: '', message: `The analysis failed: ${message}`, computeMs: now() - t0 };
	}
}
