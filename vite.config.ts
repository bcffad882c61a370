import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';

// The API server serves the built client in production; in development Vite proxies /api to it.
export default defineConfig({
  plugins: [react()],
  server: {
    port: Number(process.env.GATEPOST_VITE_PORT ?? 5173),
    proxy: { '/api': `http://127.0.0.1:${process.env.GATEPOST_PORT ?? 8640}` },
  },
  // No source maps: the production build does not hand out its sources (issue 12, item 13).
  build: { outDir: 'dist/client', sourcemap: false },
});
