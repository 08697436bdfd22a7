import adapter from '@sveltejs/adapter-static';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** @type {import('@sveltejs/kit').Config} */
const config = {
  preprocess: vitePreprocess(),
  kit: {
    // A single-page app: every route falls back to 200.html and renders in the browser.
    adapter: adapter({ fallback: '200.html' })
  }
};

export default config;
