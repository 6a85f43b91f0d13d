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
    rolldownOptions: {
      output: {
        // The chart library is most of the chart page's weight and changes only with its version: in
        // chunks of its own it stays cached across our releases. echarts and its renderer zrender make
        // about 610 kB together, so each gets a chunk (both under the 500 kB warning; the chart page
        // loads them side by side). zrender goes first: otherwise the echarts group takes it along
        // as a dependency.
        codeSplitting: {
          groups: [
            { name: 'zrender', test: /[\\/]node_modules[\\/]zrender[\\/]/, priority: 2 },
            { name: 'echarts', test: /[\\/]node_modules[\\/]echarts[\\/]/, priority: 1 },
          ],
        },
      },
    },
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
