import { error } from '@sveltejs/kit';
import type { Component } from 'svelte';
import type { PageLoad } from './$types';

// Each help page is an mdsvex component compiled at build time (code already highlighted).
const pages = import.meta.glob<{ default: Component }>('/content/help/*.md');

export const load: PageLoad = async ({ data, params }) => {
	const load = pages[`/content/help/${params.slug}.md`];
	if (!load) error(404, { message: 'There is no help page of that name.' });
	return { ...data, content: (await load()).default };
};
