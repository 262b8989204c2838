import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';

// The client lives in app/; its build lands in dist/app, which the Express server serves.
export default defineConfig({
  root: fileURLToPath(new URL('./app', import.meta.url)),
  plugins: [react(), tailwindcss()],
  resolve: {
    alias: { '@contracts': fileURLToPath(new URL('./server/contracts', import.meta.url)) },
  },
  build: {
    outDir: fileURLToPath(new URL('./dist/app', import.meta.url)),
    emptyOutDir: true,
    // Libraries change less often than our code: separate chunks keep browser caches useful
    // after an update, and keep each chunk under the size warning.
    rolldownOptions: {
      output: {
        codeSplitting: {
          groups: [
            { name: 'react', test: /node_modules[\\/](react|react-dom|scheduler|react-router)[\\/]/ },
            { name: 'vendor', test: /node_modules[\\/]/ },
          ],
        },
      },
    },
  },
  server: {
    host: '127.0.0.1',
    proxy: { '/api': 'http://127.0.0.1:8080' },
  },
});
