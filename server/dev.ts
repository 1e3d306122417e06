import { createServer } from 'vite';
import { start } from './index';

/**
 * `npm run dev`: the API on COMOVING_API_PORT (3001) and Vite's dev server, whose /api proxy
 * (vite.config.ts) forwards to it. Links in mail point to the Vite origin.
 */
const apiPort = Number(process.env.COMOVING_API_PORT ?? 3001);
const vitePort = Number(process.env.PORT ?? 5173);
process.env.COMOVING_API_PORT = String(apiPort);

const api = await start({ port: apiPort, appOrigin: process.env.COMOVING_ORIGIN ?? `http://localhost:${vitePort}`, clientDir: undefined });
const vite = await createServer({ configFile: new URL('../vite.config.ts', import.meta.url).pathname, server: { port: vitePort } });
await vite.listen();
vite.printUrls();

const shutdown = () => {
  Promise.allSettled([vite.close(), api.stop()]).finally(() => process.exit(0));
};
process.once('SIGINT', shutdown);
process.once('SIGTERM', shutdown);
