/**
 * Job scheduling of the bench: the latest request of each kind wins, the live plots go first, and
 * errors come back with the request field. A fake worker stands in for the browser's Worker and
 * answers with the real `runJob` (the engine's `analyze`).
 */
import { describe, expect, it } from 'vitest';
import { runJob, type JobMessage, type JobResult } from './jobs';
import { AnalysisRunner, type RunnerResult } from './runner';
import type { AnalysisRequest } from '../control';

const request = (kp: number): AnalysisRequest => ({
	plant: { num: [1.2], den: [4, 1], delay: 0.8 },
	controller: { type: 'PI', form: 'ideal', kp, ti: 4 },
	options: { points: 200, bodePoints: 50 }
});

class FakeWorker {
	sent: JobMessage[] = [];
	onmessage: ((e: MessageEvent<JobResult>) => void) | null = null;
	onerror: ((e: ErrorEvent) => void) | null = null;
	postMessage(m: JobMessage) {
		this.sent.push(m);
	}
	terminate() {}
	/** Answers the oldest unanswered job. */
	answer() {
		const m = this.sent.shift();
		if (m) this.onmessage?.({ data: runJob(m) } as MessageEvent<JobResult>);
	}
}

describe('AnalysisRunner', () => {
	it('computes only the newest pending main job and hands results over in order', () => {
		const fake = new FakeWorker();
		const got: RunnerResult<number>[] = [];
		const runner = new AnalysisRunner<number>((r) => got.push(r), () => fake as unknown as Worker);
		expect(runner.offMainThread).toBe(true);
		runner.schedule('main', request(1), { meta: 1 });
		runner.schedule('main', request(2), { meta: 2 });
		runner.schedule('main', request(3), { meta: 3 });
		expect(fake.sent.map((m) => m.request.controller.kp)).toEqual([1]);
		fake.answer();
		expect(fake.sent.map((m) => m.request.controller.kp)).toEqual([3]);
		fake.answer();
		expect(got.map((r) => r.meta)).toEqual([1, 3]);
		expect(got.every((r) => r.ok && r.kind === 'main')).toBe(true);
	});

	it('runs main jobs before extras and comparison sets', () => {
		const fake = new FakeWorker();
		const kinds: string[] = [];
		const runner = new AnalysisRunner((r) => kinds.push(`${r.kind}${r.key ?? ''}`), () => fake as unknown as Worker);
		runner.schedule('main', request(1));
		runner.schedule('compare', request(0.5), { key: 'a' });
		runner.schedule('extra', request(1));
		runner.schedule('compare', request(0.6), { key: 'b' });
		runner.cancelCompare('b');
		runner.schedule('main', request(2));
		for (let i = 0; i < 5; i++) fake.answer();
		expect(kinds).toEqual(['main', 'main', 'extra', 'comparea']);
	});

	it('returns input errors with the request field, and ignores results after destroy', () => {
		const fake = new FakeWorker();
		const got: RunnerResult<unknown>[] = [];
		const runner = new AnalysisRunner((r) => got.push(r), () => fake as unknown as Worker);
		runner.schedule('main', { ...request(1), controller: { type: 'PI', form: 'ideal', kp: 1, ti: -2 } });
		fake.answer();
		expect(got[0].ok).toBe(false);
		if (!got[0].ok) expect(got[0].field).toBe('controller.ti');
		runner.schedule('main', request(1));
		runner.destroy();
		fake.answer();
		expect(got).toHaveLength(1);
	});

	it('runs jobs inline on the main thread once the recent ones were fast enough, and says so', async () => {
		const fake = new FakeWorker();
		const got: RunnerResult<unknown>[] = [];
		const runner = new AnalysisRunner((r) => got.push(r), () => fake as unknown as Worker, { inlineBelowMs: 10_000 });
		for (let i = 0; i < 3; i++) {
			expect(runner.inline).toBe(false);
			runner.schedule('main', request(1 + i));
			fake.answer();
		}
		expect(runner.inline).toBe(true);
		runner.schedule('main', request(1.5));
		expect(fake.sent).toHaveLength(0);
		await Promise.resolve();
		expect(got.map((r) => r.ranInline)).toEqual([false, false, false, true]);
		expect(got[3].ok && got[3].response.closedLoop.stable).toBe(true);
	});

	it('stays in the worker when the recent jobs were slower than the budget', () => {
		const fake = new FakeWorker();
		const runner = new AnalysisRunner(() => undefined, () => fake as unknown as Worker, { inlineBelowMs: 0 });
		for (let i = 0; i < 4; i++) {
			runner.schedule('main', request(1));
			fake.answer();
		}
		expect(runner.inline).toBe(false);
	});

	it('computes on the main thread when there is no worker', async () => {
		const got: RunnerResult<unknown>[] = [];
		const runner = new AnalysisRunner((r) => got.push(r), () => null);
		expect(runner.offMainThread).toBe(false);
		runner.schedule('main', request(1));
		await new Promise((r) => setTimeout(r, 20));
		expect(got).toHaveLength(1);
		expect(got[0].ok && got[0].response.closedLoop.stable).toBe(true);
	});
});
