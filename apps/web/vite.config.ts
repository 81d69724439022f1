import tailwindcss from '@tailwindcss/vite';
import react from '@vitejs/plugin-react';
import { fileURLToPath } from 'node:url';
import { defineConfig, loadEnv } from 'vite';
import { z } from 'zod';

const appDir = fileURLToPath(new URL('.', import.meta.url));

// The dev server's only setting from the environment: where the API listens.
const DevEnv = z.object({
  EARMARK_API_URL: z.url().default('http://127.0.0.1:4310'),
});

export default defineConfig(({ mode }) => {
  // Empty prefix: read EARMARK_API_URL from the shell as well as from .env files.
  const env = DevEnv.parse(loadEnv(mode, appDir, ''));
  const proxy = { '/api': { target: env.EARMARK_API_URL, changeOrigin: false } };
  return {
    plugins: [react(), tailwindcss()],
    resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
    server: { host: '127.0.0.1', port: 4311, strictPort: true, proxy },
    preview: { host: '127.0.0.1', port: 4311, strictPort: true, proxy },
    build: {
      outDir: 'dist',
      emptyOutDir: true,
      sourcemap: true,
      rolldownOptions: {
        output: {
          // Libraries change far less often than our code; separate chunks stay cached
          // across deploys.
          codeSplitting: {
            groups: [
              { name: 'react', test: /node_modules[\\/](react|react-dom|scheduler|react-router)[\\/]/ },
              { name: 'vendor', test: /node_modules[\\/]/ },
            ],
          },
        },
      },
    },
  };
});
