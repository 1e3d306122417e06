/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';

const apiPort = Number(process.env.COMOVING_API_PORT ?? 3001);

export default defineConfig({
  root: import.meta.dirname,
  plugins: [vue()],
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    chunkSizeWarningLimit: 4000,
  },
  server: {
    port: Number(process.env.PORT ?? 5173),
    proxy: {
      '/api': { target: `http://127.0.0.1:${apiPort}`, changeOrigin: false },
    },
  },
  test: {
    include: ['tests/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
