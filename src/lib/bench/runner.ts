/**
 * Schedules the bench's analysis jobs on one web worker, latest request wins: while a job runs,
 * only the newest pending job of each kind is kept (older ones are dropped, never computed), and
 * the live plots (`main`) go before the slower extras and the comparison sets. Falls back to the
 * main thread (one job per macrotask) where workers are not available.
 *
 * With `inlineBelowMs`, jobs whose recent computing times (median of the last eight) stay below
 * that budget run on the main thread right after the current task's state updates instead: one
 * rendered frame per input instead of two (the controls', then the charts'), with no message
 * round trip. A slower loop (a high-order plant, a long dead time) goes back to the worker.
 */
import type { AnalysisRequest } from '../control';
import { runJob, type JobKind, type JobMessage, type JobResult } from './jobs';

/** A finished job with the caller's tag (e.g. the input time it answers) and where it ran. */
export type RunnerResult<M> = JobResult & { meta: M | undefined; ranInline: boolean };

/** The job scheduler described above; `M` is the caller's tag carried from `schedule` to the result. */
export class AnalysisRunner<M = unknown> {
	#worker: Worker | null = null;
	#busy: { id: number; meta: M | undefined; inline: boolean } | null = null;
	#main: { request: AnalysisRequest; meta: M | undefined } | null = null;
	#extra: { request: AnalysisRequest; meta: M | undefined } | null = null;
	#compare = new Map<string, AnalysisRequest>();
	#nextId = 1;
	#closed = false;
	#recent: number[] = [];
	readonly #inlineBelowMs: number | null;
	readonly #onResult: (r: RunnerResult<M>) => void;

	/** `makeWorker` returns the worker (null to compute on the main thread). */
	constructor(onResult: (r: RunnerResult<M>) => void, makeWorker: () => Worker | null, options: { inlineBelowMs?: number } = {}) {
		this.#onResult = onResult;
		this.#inlineBelowMs = options.inlineBelowMs ?? null;
		try {
			this.#worker = makeWorker();
		} catch {
			this.#worker = null;
		}
		if (this.#worker) {
			this.#worker.onmessage = (e: MessageEvent<JobResult>) => this.#finish(e.data);
			this.#worker.onerror = (e) => {
				e.preventDefault();
				// A worker that cannot start (e.g. blocked by policy): compute on the main thread instead.
				this.#worker?.terminate();
				this.#worker = null;
				if (this.#busy) {
					this.#busy = null;
					this.#pump();
				}
			};
		}
	}

	/** True when jobs run in a web worker. */
	get offMainThread(): boolean {
		return this.#worker !== null;
	}

	/** True when the next job will run on the main thread (no worker, or fast enough to run inline). */
	get inline(): boolean {
		if (!this.#worker) return true;
		if (this.#inlineBelowMs === null || this.#recent.length < 3) return false;
		const sorted = [...this.#recent].sort((a, b) => a - b);
		return sorted[sorted.length >> 1] < this.#inlineBelowMs;
	}

	/** Queues a job; a pending job of the same kind (and key) is replaced. */
	schedule(kind: JobKind, request: AnalysisRequest, options: { key?: string; meta?: M } = {}): void {
		if (this.#closed) return;
		if (kind === 'main') this.#main = { request, meta: options.meta };
		else if (kind === 'extra') this.#extra = { request, meta: options.meta };
		else this.#compare.set(options.key ?? '', request);
		this.#pump();
	}

	/** Drops a pending comparison job. */
	cancelCompare(key: string): void {
		this.#compare.delete(key);
	}

	/** Stops the worker; later results are ignored. */
	destroy(): void {
		this.#closed = true;
		this.#worker?.terminate();
		this.#worker = null;
	}

	#pump() {
		if (this.#busy || this.#closed) return;
		let msg: JobMessage | null = null;
		let meta: M | undefined;
		const id = this.#nextId++;
		if (this.#main) {
			msg = { id, kind: 'main', request: this.#main.request };
			meta = this.#main.meta;
			this.#main = null;
		} else if (this.#extra) {
			msg = { id, kind: 'extra', request: this.#extra.request };
			meta = this.#extra.meta;
			this.#extra = null;
		} else {
			const first = this.#compare.entries().next();
			if (!first.done) {
				const [key, request] = first.value;
				this.#compare.delete(key);
				msg = { id, kind: 'compare', key, request };
			}
		}
		if (!msg) return;
		const inline = this.inline;
		this.#busy = { id, meta, inline };
		const m = msg;
		if (!this.#worker) setTimeout(() => this.#finish(runJob(m)), 0);
		else if (inline) queueMicrotask(() => this.#finish(runJob(m)));
		else this.#worker.postMessage(msg);
	}

	#finish(result: JobResult) {
		if (this.#closed) return;
		const busy = this.#busy;
		if (!busy || busy.id !== result.id) return;
		this.#busy = null;
		this.#recent.push(result.computeMs);
		if (this.#recent.length > 8) this.#recent.shift();
		// Start the next job before handing this result over, so the worker computes while the page draws.
		this.#pump();
		this.#onResult({ ...result, meta: busy.meta, ranInline: busy.inline });
	}
}
