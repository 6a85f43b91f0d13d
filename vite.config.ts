import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// The web app lives in web/; the API server serves web/dist with an SPA fallback in production.
// In development the API runs on :3000 and Vite proxies /api to it, so cookies stay same-origin.
export default defineConfig({
  root: 'web',
  plugins: [react(), tailwindcss()],
  // The path aliases (@shared/…, @web/…) are declared once, in tsconfig.json.
  resolve: { tsconfigPaths: true },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
  },
  server: {
    host: '127.0.0.1',
    port: 5173,
    strictPort: true,
    proxy: {
      '/api': 'http://127.0.0.1:3000',
    },
  },
});
