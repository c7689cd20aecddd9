import { defineConfig } from 'vite';
import { fileURLToPath } from 'node:url';

// The web client: client/index.html and what it imports (client/, shared/, lit, uplot), built to
// client/dist, which the server serves at /. Everything is bundled: no request leaves the machine.
const root = fileURLToPath(new URL('./client', import.meta.url));

export default defineConfig({
  root,
  base: '/',
  publicDir: false,
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    target: 'es2022',
    sourcemap: false,
    chunkSizeWarningLimit: 700,
  },
  server: { proxy: { '/api': 'http://127.0.0.1:8080' } },
});
