import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';
import { collabDevPlugin } from './server/dev-plugin';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit(), collabDevPlugin()],
	test: {
		// A polled assertion waits for the app, not for a fixed second: busy machines are slower.
		expect: { poll: { timeout: 15_000 } },
		projects: [
			{
				extends: true,
				test: {
					name: 'unit',
					include: ['tests/unit/**/*.test.ts'],
					environment: 'node',
					// Property tests and image work take seconds on a busy two-core machine.
					testTimeout: 30_000
				}
			},
			{
				extends: true,
				test: {
					name: 'integration',
					globalSetup: ['tests/helpers/global-setup.ts'],
					include: ['tests/integration/**/*.test.ts'],
					environment: 'node',
					testTimeout: 60_000,
					hookTimeout: 120_000
				}
			},
			{
				extends: true,
				test: {
					name: 'e2e',
					globalSetup: ['tests/helpers/global-setup.ts'],
					include: ['tests/e2e/**/*.test.ts'],
					environment: 'node',
					testTimeout: 120_000,
					hookTimeout: 120_000,
					fileParallelism: false
				}
			}
		]
	}
});
