import { existsSync } from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express from 'express';
import helmet from 'helmet';
import type { AppDeps } from './deps';
import { apiNotFound, errorHandler } from './http/errors';
import { originCheck } from './http/origin';
import { requestId } from './http/requestId';
import { mountRoutes } from './routes/index';

export const JSON_LIMIT = '1mb';

export function createApp(deps: AppDeps): express.Express {
  const app = express();
  const https = deps.config.appOrigin.startsWith('https:');
  app.locals.deps = deps;
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(requestId({ logRequests: deps.config.logRequests }));
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // naive-ui injects its styles at run time; Monaco and echarts use blob: workers and data: images.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'worker-src': ["'self'", 'blob:'],
          'font-src': ["'self'", 'data:'],
          // Over plain http on loopback an upgrade would break every asset.
          'upgrade-insecure-requests': https ? [] : null,
        },
      },
      strictTransportSecurity: https,
    }),
  );
  app.use(originCheck(deps.config.appOrigin));
  app.use(express.json({ limit: JSON_LIMIT }));
  app.use(cookieParser());
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });

  mountRoutes(app, deps);
  app.use('/api', apiNotFound);

  const clientDir = deps.config.clientDir;
  if (clientDir && existsSync(path.join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
    // The client routes in the browser: any other GET gets the app shell.
    app.use((req, res, next) => {
      if (req.method !== 'GET' && req.method !== 'HEAD') return next();
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }
  app.use((req, res) => {
    res.status(404).json({ error: { code: 'not_found', message: `Nothing at ${req.method} ${req.path}.` } });
  });
  app.use(errorHandler);
  return app;
}
