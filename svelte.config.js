import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';
import { mdsvex } from 'mdsvex';
import { highlightForMdsvex } from './src/lib/markdown/highlighter.js';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	extensions: ['.svelte', '.md'],
	preprocess: [
		vitePreprocess(),
		// Help pages: code is highlighted here, at build time, with the instructions' own shiki set-up.
		mdsvex({ extensions: ['.md'], highlight: { highlighter: highlightForMdsvex } })
	],
	kit: {
		adapter: adapter(),
		// Nonces for SvelteKit's own inline bootstrap script; no 'unsafe-inline' for scripts anywhere.
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				'style-src': ['self', 'unsafe-inline'],
				'img-src': ['self', 'data:', 'blob:'],
				'font-src': ['self'],
				'connect-src': ['self'],
				'object-src': ['none'],
				'base-uri': ['self'],
				'form-action': ['self'],
				'frame-ancestors': ['none']
			}
		},
		alias: { $content: 'content' }
	}
};

export default config;
