import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

const apiPort = Number(process.env.PORT ?? 8080);

export default defineConfig({
  plugins: [react(), tailwindcss()],
  // react-signature-canvas ships a UMD bundle; without this the default import is an object in the built app.
  legacy: { inconsistentCjsInterop: true },
  server: {
    port: 5173,
    proxy: { '/api': `http://localhost:${apiPort}` },
  },
  build: { outDir: 'dist', sourcemap: false, chunkSizeWarningLimit: 700 },
});
