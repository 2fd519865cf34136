import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	server: { host: '127.0.0.1' },
	test: {
		projects: [
			{
				extends: true,
				test: {
					name: 'unit',
					include: ['src/**/*.spec.ts', 'tests/unit/**/*.spec.ts', 'tests/reference/**/*.spec.ts'],
					environment: 'node'
				}
			},
			{
				extends: true,
				test: {
					name: 'integration',
					include: ['tests/integration/**/*.spec.ts'],
					environment: 'node',
					fileParallelism: false,
					testTimeout: 30_000,
					hookTimeout: 60_000
				}
			},
			{
				extends: true,
				test: {
					name: 'browser',
					include: ['tests/browser/**/*.spec.ts'],
					// Vitest sets BASE_URL to Vite's base ('/') inside tests: keep the server's address.
					env: { BASE_URL: process.env.BASE_URL ?? '' },
					environment: 'node',
					fileParallelism: false,
					testTimeout: 60_000,
					hookTimeout: 60_000
				}
			}
		]
	}
});
