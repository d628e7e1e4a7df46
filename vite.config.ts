import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	server: { host: '127.0.0.1' },
	build: {
		// Small font slices would otherwise be inlined as data: URIs, which the CSP (font-src
		// 'self') rightly refuses; every font is served as its own file.
		assetsInlineLimit: (file: string) => (/\.(woff2?|ttf|otf)$/.test(file) ? false : undefined)
	},
	test: {
		projects: [
			{
				extends: true,
				test: {
					name: 'unit',
					include: ['src/**/*.spec.ts'],
					environment: 'node'
				}
			},
			{
				extends: true,
				test: {
					name: 'integration',
					include: ['tests/integration/**/*.test.ts'],
					environment: 'node',
					// One MariaDB shared by all files: run them one after another.
					fileParallelism: false,
					testTimeout: 30_000,
					hookTimeout: 60_000
				}
			},
			// Through the balancer of `npm test`'s cluster step, which sets CLUSTER_INSTANCES.
			...(process.env.CLUSTER_INSTANCES
				? [
						{
							extends: true as const,
							test: {
								name: 'cluster',
								include: ['tests/cluster/**/*.test.ts'],
								environment: 'node',
								fileParallelism: false,
								testTimeout: 90_000,
								hookTimeout: 60_000
							}
						}
					]
				: [])
		]
	}
});
