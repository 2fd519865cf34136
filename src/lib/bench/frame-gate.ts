/**
 * requestAnimationFrame coalescing for the bench's live recompute: at most one job is started per
 * animation frame. The first change in a frame goes at once (no added latency); later changes in
 * the same frame are merged into one job that starts at the next frame.
 */
export class FrameGate<T> {
	#ranThisFrame = false;
	#armed = false;
	#queued: T | null = null;
	readonly #run: (item: T) => void;
	readonly #raf: (cb: () => void) => unknown;
	readonly #merge: (older: T, newer: T) => T;

	/**
	 * `run` starts a job; `raf` schedules a callback at the next frame (requestAnimationFrame in the
	 * page); `merge` combines a queued item with a newer one (default: keep the newer).
	 */
	constructor(run: (item: T) => void, raf: (cb: () => void) => unknown, merge: (older: T, newer: T) => T = (_older, newer) => newer) {
		this.#run = run;
		this.#raf = raf;
		this.#merge = merge;
	}

	/** Starts the job now if none started in this frame, otherwise at the next frame (merged with any other waiting). */
	submit(item: T): void {
		if (!this.#ranThisFrame) {
			this.#ranThisFrame = true;
			this.#arm();
			this.#run(item);
			return;
		}
		this.#queued = this.#queued === null ? item : this.#merge(this.#queued, item);
		this.#arm();
	}

	#arm() {
		if (this.#armed) return;
		this.#armed = true;
		this.#raf(() => {
			this.#armed = false;
			this.#ranThisFrame = false;
			const q = this.#queued;
			this.#queued = null;
			if (q !== null) this.submit(q);
		});
	}
}
