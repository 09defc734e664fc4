import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

export const alias = {
  '@client': here('./client/src'),
  '@server': here('./server/src'),
  '@shared': here('./shared'),
  '@db': here('./db'),
};

// Client build (root: client/). In development `npm run dev` proxies /api to the Express server.
export default defineConfig({
  root: here('./client'),
  plugins: [react(), tailwindcss()],
  resolve: { alias },
  build: { outDir: here('./dist/client'), emptyOutDir: true, chunkSizeWarningLimit: 1500 },
  server: {
    proxy: { '/api': `http://127.0.0.1:${process.env.PORT ?? 3000}` },
  },
});
