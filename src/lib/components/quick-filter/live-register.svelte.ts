/**
 * The register's quick text filter, live: as the person types, the register asks the JSON API
 * (`GET /api/v1/models`, same filters, sort and paging as the page) and shows the answer in place,
 * without a navigation; the address bar follows (`replaceState`, so the link stays shareable and no
 * history entry piles up). Until the first answer, and after every real navigation (`reset`), the
 * page's own data shows. Without JavaScript the filter form's GET submit does the same job.
 */
import type { RegisterRow } from '$lib/server/register';
import { registerSearch, type RegisterQuery } from '$lib/schemas/register';
import { createSearchClient, type SearchClient } from './search-client';

/** One page of the register, as the page and the API both give it. */
export interface RegisterPageView {
	rows: RegisterRow[];
	total: number;
	page: number;
	pageCount: number;
	pageSize: number;
	today: string;
}

/** The API's answer (`GET /api/v1/models`). */
interface ApiPage {
	models: RegisterRow[];
	total: number;
	page: number;
	pageCount: number;
	pageSize: number;
	today: string;
	query: RegisterQuery;
}

/** Quiet time after the last keystroke before the register asks, in milliseconds. */
export const QUICK_FILTER_DELAY_MS = 250;

/** Live register state for one page instance (see the module comment). */
export class LiveRegister {
	/** The newest answer of the API, or null while the page's data is current. */
	answer = $state<{ query: RegisterQuery; page: RegisterPageView } | null>(null);
	/** A request is running. */
	pending = $state(false);
	#base: () => { query: RegisterQuery; page: RegisterPageView };
	#client: SearchClient;

	/**
	 * `base` gives the page's current query and page (from `load`); `onUrl` is called with the new
	 * search string (`?q=…`) after each answer, to update the address bar; `onFailure` when the API
	 * cannot answer, with the same search string (the page then navigates the classic way).
	 */
	constructor(
		base: () => { query: RegisterQuery; page: RegisterPageView },
		onUrl: (search: string) => void,
		onFailure: (search: string) => void,
		fetcher: typeof fetch = (...args) => fetch(...args)
	) {
		this.#base = base;
		this.#client = createSearchClient<ApiPage>({
			fetch: fetcher,
			delayMs: QUICK_FILTER_DELAY_MS,
			url: (text) => `/api/v1/models${this.#search(text)}`,
			onResult: (text, body) => {
				const { models, query, ...page } = body;
				this.answer = { query, page: { ...page, rows: models } };
				onUrl(this.#search(text));
			},
			onError: (text) => onFailure(this.#search(text)),
			onPending: (p) => (this.pending = p)
		});
	}

	/** The page's query with the text replaced (and back to page 1), as a URL search string. */
	#search(text: string): string {
		const q = text.trim();
		return registerSearch(this.#base().query, { q: q === '' ? undefined : q });
	}

	/** The query the list shows now. */
	get query(): RegisterQuery {
		return this.answer?.query ?? this.#base().query;
	}

	/** The page of rows the list shows now. */
	get page(): RegisterPageView {
		return this.answer?.page ?? this.#base().page;
	}

	/** The text changed: ask after a short quiet time (the running request is aborted). */
	type(text: string): void {
		const q = text.trim();
		if (q === (this.query.q ?? '')) {
			this.#client.cancel();
			return;
		}
		this.#client.type(q);
	}

	/** A real navigation brought new data: forget the live answer and any request in flight. */
	reset(): void {
		this.#client.cancel();
		this.answer = null;
	}
}
