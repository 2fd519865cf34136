/**
 * The quick filter's search client: one request after the typing stops, the request in flight
 * aborted when a newer one starts, only the newest answer delivered, errors reported with the
 * server's message. Fake timers and a fake fetch; no network.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createSearchClient } from './search-client';

interface Call {
	url: string;
	signal: AbortSignal;
	resolve: (r: Response) => void;
	reject: (e: unknown) => void;
}

/** A fetch that answers when the test says; `honourAbort: false` acts like a server whose answer was already on its way. */
function fakeFetch(honourAbort = true) {
	const calls: Call[] = [];
	const fetch = ((url: string, init?: RequestInit) =>
		new Promise<Response>((resolve, reject) => {
			const signal = init!.signal!;
			if (honourAbort) signal.addEventListener('abort', () => reject(new DOMException('aborted', 'AbortError')));
			calls.push({ url, signal, resolve, reject });
		})) as unknown as typeof globalThis.fetch;
	return { fetch, calls };
}

const answer = (body: unknown, status = 200) => new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });

describe('createSearchClient', () => {
	beforeEach(() => vi.useFakeTimers());
	afterEach(() => vi.useRealTimers());

	function setup(honourAbort = true) {
		const { fetch, calls } = fakeFetch(honourAbort);
		const results: Array<[string, unknown]> = [];
		const errors: Array<[string, string, number | null]> = [];
		const pending: boolean[] = [];
		const client = createSearchClient<{ n: number }>({
			fetch,
			delayMs: 250,
			url: (q) => `/api/v1/models?q=${encodeURIComponent(q)}`,
			onResult: (q, r) => results.push([q, r]),
			onError: (q, m, s) => errors.push([q, m, s]),
			onPending: (p) => pending.push(p)
		});
		return { client, calls, results, errors, pending };
	}

	it('asks once, after the typing stops', async () => {
		const { client, calls, results } = setup();
		client.type('t');
		await vi.advanceTimersByTimeAsync(100);
		client.type('ti');
		await vi.advanceTimersByTimeAsync(100);
		client.type('tic');
		await vi.advanceTimersByTimeAsync(249);
		expect(calls).toHaveLength(0);
		await vi.advanceTimersByTimeAsync(1);
		expect(calls.map((c) => c.url)).toEqual(['/api/v1/models?q=tic']);
		calls[0].resolve(answer({ n: 3 }));
		await vi.runAllTimersAsync();
		expect(results).toEqual([['tic', { n: 3 }]]);
	});

	it('aborts the request in flight when a newer one starts, and never delivers a stale answer', async () => {
		const { client, calls, results, errors, pending } = setup();
		client.type('ov');
		await vi.advanceTimersByTimeAsync(250);
		client.type('oven');
		await vi.advanceTimersByTimeAsync(250);
		expect(calls).toHaveLength(2);
		expect(calls[0].signal.aborted).toBe(true);
		expect(calls[1].signal.aborted).toBe(false);
		calls[1].resolve(answer({ n: 1 }));
		await vi.runAllTimersAsync();
		expect(results).toEqual([['oven', { n: 1 }]]);
		expect(errors).toEqual([]);
		expect(pending[pending.length - 1]).toBe(false);
	});

	it('drops an answer that arrives after a newer request started, even if it was not aborted in time', async () => {
		const { client, calls, results } = setup(false);
		void client.now('a');
		void client.now('ab');
		calls[0].resolve(answer({ n: 9 }));
		calls[1].resolve(answer({ n: 2 }));
		await vi.runAllTimersAsync();
		expect(results).toEqual([['ab', { n: 2 }]]);
	});

	it('reports the server’s message and status for a refused request', async () => {
		const { client, calls, errors, results } = setup();
		void client.now('x'.repeat(101));
		calls[0].resolve(answer({ error: 'bad_request', message: 'q must be at most 100 characters', field: 'q' }, 400));
		await vi.runAllTimersAsync();
		expect(results).toEqual([]);
		expect(errors).toEqual([['x'.repeat(101), 'q must be at most 100 characters', 400]]);
	});

	it('reports a network failure without a status', async () => {
		const { client, calls, errors } = setup();
		void client.now('tic');
		calls[0].reject(new TypeError('Failed to fetch'));
		await vi.runAllTimersAsync();
		expect(errors).toEqual([['tic', 'Failed to fetch', null]]);
	});

	it('cancel drops the timer and the request in flight; nothing is delivered afterwards', async () => {
		const { client, calls, results, errors } = setup();
		client.type('tic');
		client.cancel();
		await vi.advanceTimersByTimeAsync(1000);
		expect(calls).toHaveLength(0);
		void client.now('ov');
		client.cancel();
		expect(calls[0].signal.aborted).toBe(true);
		await vi.runAllTimersAsync();
		expect(results).toEqual([]);
		expect(errors).toEqual([]);
	});
});
