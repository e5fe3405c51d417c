import adapter from '@sveltejs/adapter-node';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	kit: {
		// Separate output folders let several test runs build side by side.
		adapter: adapter({ out: process.env.MENDWISE_BUILD_DIR ?? 'build', precompress: true }),
		outDir: process.env.MENDWISE_KIT_DIR ?? '.svelte-kit',
		// Strict by default: only same-origin script, style, images and fonts. SvelteKit adds
		// nonces/hashes for its own inline bootstrap script.
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				'style-src': ['self', 'unsafe-inline'],
				'img-src': ['self', 'data:', 'blob:'],
				'font-src': ['self'],
				'connect-src': ['self'],
				'form-action': ['self'],
				'frame-ancestors': ['none'],
				'base-uri': ['self'],
				'object-src': ['none']
			}
		},
		typescript: {
			config(config) {
				config.include.push('../scripts/**/*.ts', '../tests/**/*.ts', '../vitest.config.ts');
				return config;
			}
		}
	}
};

export default config;
