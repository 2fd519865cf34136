import { error } from '@sveltejs/kit';
import type { Component } from 'svelte';
import type { PageLoad } from './$types';

/** The guide pages: our own Markdown (mdsvex, KaTeX) in content/, one per metric group. */
const PAGES = import.meta.glob<{ default: Component; metadata?: { title?: string; summary?: string } }>('/content/*.md');

/** Reading order of the guide pages in the navigation (others follow). */
const ORDER = ['step-response', 'load-response', 'steady-state', 'dominant-poles', 'stability-margins', 'controller-forms'];

/** One guide page by slug (404 when there is none), with the titles of all pages for navigation. */
export const load = (async ({ params }) => {
	const entry = PAGES[`/content/${params.slug}.md`];
	if (!entry) error(404, 'There is no guide page with this name.');
	const mod = await entry();
	const all = await Promise.all(
		Object.entries(PAGES).map(async ([path, imp]) => {
			const slug = path.replace(/^\/content\//, '').replace(/\.md$/, '');
			return { slug, title: (await imp()).metadata?.title ?? slug };
		})
	);
	all.sort((a, b) => (ORDER.indexOf(a.slug) + 1 || 99) - (ORDER.indexOf(b.slug) + 1 || 99));
	return {
		slug: params.slug,
		title: mod.metadata?.title ?? params.slug,
		summary: mod.metadata?.summary ?? null,
		content: mod.default,
		pages: all
	};
}) satisfies PageLoad;
