import { sveltekit } from '@sveltejs/kit/vite';
import { defineConfig } from 'vitest/config';

// Three groups: pure unit tests, integration tests against the real PostgreSQL and the running
// app, and browser tests driving Chromium. `npm test` prepares the services the last two need.
export default defineConfig({
	plugins: [sveltekit()],
	test: {
		testTimeout: 30_000,
		hookTimeout: 120_000,
		projects: [
			{ extends: true, test: { name: 'unit', include: ['tests/unit/**/*.test.ts', 'src/**/*.test.ts'] } },
			{ extends: true, test: { name: 'integration', include: ['tests/integration/**/*.test.ts'] } },
			{
				extends: true,
				test: { name: 'e2e', include: ['tests/e2e/**/*.test.ts'], fileParallelism: false, testTimeout: 120_000 }
			}
		]
	}
});
