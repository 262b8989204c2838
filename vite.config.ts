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
    // the workspace's library chunk holds three.js (~700 kB minified on its own); it loads only on
    // the design workspace route, so the default 500 kB warning would only be noise
    chunkSizeWarningLimit: 1200,
    // Libraries change less often than our code: separate chunks keep browser caches useful
    // after an update, and keep each chunk under the size warning.
    rolldownOptions: {
      output: {
        codeSplitting: {
          groups: [
            { name: 'react', test: /node_modules[\\/](react|react-dom|scheduler|react-router)[\\/]/, priority: 3 },
            // three.js, its React bindings and the editor's store and table libraries serve only the
            // design workspace (a lazy route): their own chunk, so no other page downloads them
            { name: 'workspace-libs', test: /node_modules[\\/](zundo|@tanstack[\\/](react-table|table-core|react-virtual|virtual-core)|delaunator|robust-predicates|three|three-stdlib|three-mesh-bvh|@react-three|troika-[^\\/]+|camera-controls|maath|meshline|stats-gl|@monogrid|hls\.js|suspend-react|its-fine|react-use-measure|zustand|detect-gpu|tunnel-rat|@use-gesture|bidi-js|webgl-sdf-generator|@mediapipe)[\\/]/, priority: 2 },
            // the charting package and its d3 pieces serve only the workspace's run results
            { name: 'charts', test: /node_modules[\\/](recharts|victory-vendor|d3-[^\\/]+|internmap|@reduxjs|redux|react-redux|redux-thunk|immer|reselect|decimal\.js-light|es-toolkit)[\\/]/, priority: 2 },
            { name: 'vendor', test: /node_modules[\\/]/, priority: 1 },
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
