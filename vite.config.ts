// The renderer's build (npm run build:app): app/ → dist/renderer, loaded by browser mode
// (main/serve.ts) and by the Electron shell. Relative asset paths so both can load it; the
// Content-Security-Policy of electron.config.ts is written into the page as well (browser mode
// also sends it as a header; the Electron shell loads the page from disk, where only the meta
// tag applies).

import { svelte } from '@sveltejs/vite-plugin-svelte';
import { defineConfig, type Plugin } from 'vite';
import buildConfig from './electron.config.ts';

function contentSecurityPolicy(): Plugin {
  // frame-ancestors is ignored in a meta tag (the header carries it); leave it out there.
  const policy = buildConfig.contentSecurityPolicy.split(';').map((d) => d.trim()).filter((d) => d && !d.startsWith('frame-ancestors')).join('; ');
  return {
    name: 'fenceline-csp',
    transformIndexHtml: (html) => html.replace('<head>', `<head>\n    <meta http-equiv="Content-Security-Policy" content="${policy}">`),
  };
}

export default defineConfig({
  root: 'app',
  base: './',
  plugins: [svelte(), contentSecurityPolicy()],
  build: {
    outDir: `../${buildConfig.outDir}/renderer`,
    emptyOutDir: true,
    target: 'es2022',
    // No inline scripts: the module-preload helper and every chunk are files.
    modulePreload: { polyfill: false },
    assetsInlineLimit: 0,
    chunkSizeWarningLimit: 1500,
  },
  server: { host: '127.0.0.1', fs: { allow: ['..'] } },
});
