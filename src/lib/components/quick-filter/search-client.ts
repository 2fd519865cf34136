/**
 * Search as you type, without piling up requests: each keystroke restarts a debounce timer; when
 * it fires, the previous request (if still running) is aborted and a new one starts; only the
 * newest request's answer is delivered. Pure TypeScript with an injectable `fetch`, so it runs in
 * the browser and in unit tests.
 */

/** What the client needs: how to fetch, where to ask, how long to wait, and where answers go. */
export interface SearchClientOptions<T> {
	fetch: typeof fetch;
	/** The URL to ask for a given text. */
	url: (text: string) => string;
	/** Quiet time after the last keystroke before asking, in milliseconds. */
	delayMs: number;
	/** The newest answer (never a stale one), with the text it answers. */
	onResult: (text: string, result: T) => void;
	/** The newest request failed (HTTP error or network); `status` is null for a network failure. */
	onError: (text: string, message: string, status: number | null) => void;
	/** A request started (true) or the newest one ended (false). */
	onPending?: (pending: boolean) => void;
}

/** The handle of a search client. */
export interface SearchClient {
	/** The text changed: ask after `delayMs` of quiet. */
	type(text: string): void;
	/** Ask now for `text` (e.g. on Enter), skipping the wait. */
	now(text: string): Promise<void>;
	/** Drop the timer and abort the request in flight; nothing more is delivered for them. */
	cancel(): void;
}

/** A debounced, abortable search client (see the module comment). */
export function createSearchClient<T>(options: SearchClientOptions<T>): SearchClient {
	let timer: ReturnType<typeof setTimeout> | undefined;
	let controller: AbortController | null = null;
	let sequence = 0;

	async function run(text: string): Promise<void> {
		controller?.abort();
		const mine = new AbortController();
		controller = mine;
		const id = ++sequence;
		options.onPending?.(true);
		try {
			const response = await options.fetch(options.url(text), { signal: mine.signal, headers: { accept: 'application/json' } });
			const body: unknown = await response.json().catch(() => null);
			if (id !== sequence) return;
			if (!response.ok) {
				const message = body && typeof body === 'object' && 'message' in body ? String((body as { message: unknown }).message) : `HTTP ${response.status}`;
				options.onError(text, message, response.status);
			} else {
				options.onResult(text, body as T);
			}
		} catch (e) {
			if (id !== sequence || mine.signal.aborted) return;
			options.onError(text, e instanceof Error ? e.message : 'The request failed.', null);
		} finally {
			if (id === sequence) {
				controller = null;
				options.onPending?.(false);
			}
		}
	}

	return {
		type(text) {
			clearTimeout(timer);
			timer = setTimeout(() => void run(text), options.delayMs);
		},
		now(text) {
			clearTimeout(timer);
			return run(text);
		},
		cancel() {
			clearTimeout(timer);
			timer = undefined;
			sequence++;
			controller?.abort();
			controller = null;
			options.onPending?.(false);
		}
	};
}
