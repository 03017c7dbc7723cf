import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { compression } from 'vite-plugin-compression2';

const apiPort = Number(process.env.PORT ?? 8080);

export default defineConfig({
  // Every text asset is also written as .br and .gz at the highest levels once, at build time; the server sends the
  // one the browser accepts (server/app.ts). Images and fonts are compressed already.
  plugins: [react(), tailwindcss(), compression({ algorithms: ['brotliCompress', 'gzip'], include: /\.(js|css|html|svg|json|txt|map)$/, threshold: 512 })],
  // react-signature-canvas ships a UMD bundle; without this the default import is an object in the built app.
  legacy: { inconsistentCjsInterop: true },
  server: {
    port: 5173,
    proxy: { '/api': `http://localhost:${apiPort}` },
  },
  build: { outDir: 'dist', sourcemap: false, chunkSizeWarningLimit: 700 },
});
