import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	test: {
		// Three projects, one run: `npm test` sums their results into its closing line.
		projects: [
			{
				extends: true,
				test: {
					name: 'unit',
					include: ['src/**/*.spec.ts'],
					exclude: ['src/**/*.db.spec.ts'],
					environment: 'node',
					setupFiles: ['tests/setup/fast-check.ts']
				}
			},
			{
				extends: true,
				test: {
					name: 'db',
					include: ['src/**/*.db.spec.ts', 'tests/integration/**/*.spec.ts'],
					environment: 'node',
					setupFiles: ['tests/setup/fast-check.ts'],
					globalSetup: ['tests/setup/db-global.ts'],
					testTimeout: 60_000,
					hookTimeout: 120_000
				}
			},
			{
				extends: true,
				test: {
					name: 'e2e',
					include: ['tests/e2e/**/*.e2e.ts', 'tests/access/**/*.e2e.ts'],
					environment: 'node',
					globalSetup: ['tests/setup/server-global.ts'],
					testTimeout: 120_000,
					hookTimeout: 180_000,
					fileParallelism: false
				}
			}
		]
	}
});
