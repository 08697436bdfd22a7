import adapter from '@sveltejs/adapter-static';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
  preprocess: vitePreprocess(),
  kit: {
    // A single-page app: every route falls back to 200.html and renders in the browser.
    adapter: adapter({ fallback: '200.html' }),
    // The document's policy, written into the built pages as a <meta> (a static host sends
    // no headers of ours). SvelteKit adds the hash of its inline start-up script. No
    // 'unsafe-eval' here: generated code runs only in the engine worker, whose own script
    // response carries no policy (DEVELOPERS.md, decision 4). Inline styles are allowed
    // because Svelte style attributes and KaTeX's markup carry them.
    csp: {
      mode: 'hash',
      directives: {
        'default-src': ['self'],
        'script-src': ['self'],
        'style-src': ['self', 'unsafe-inline'],
        'img-src': ['self', 'data:', 'blob:'],
        'font-src': ['self', 'data:'],
        'connect-src': ['self'],
        'worker-src': ['self'],
        'manifest-src': ['self'],
        'object-src': ['none'],
        'base-uri': ['self'],
        'form-action': ['self']
      }
    }
  }
};

export default config;
