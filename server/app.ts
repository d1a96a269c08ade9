/**
 * createApp({ config, dataSource, logger? }) → the Express app, nothing listening yet.
 * API tests run it in-process on a real PostgreSQL; server/main.ts puts it on a port.
 */
import express, { type Express } from 'express';
import helmet from 'helmet';
import type { DataSource } from 'typeorm';
import { authRouter, meRouter } from './auth/routes';
import { cors } from './http/cors';
import type { Config } from './config';
import type { Deps } from './context';
import { devRouter } from './dev/routes';
import { AppError, apiNotFound, errorMiddleware } from './errors';
import { analysisRouter } from './analysis/routes';
import { roundsRouter } from './analysis/rounds-routes';
import { exportsRouter } from './exports/routes';
import { refuseUnstorableText } from './http/text-guard';
import { instrumentsRouter } from './instruments/routes';
import type { Notifier } from './notify';
import { workOrdersRouter } from './work-orders/routes';
import { httpLogger, makeLogger, type Logger } from './logger';
import { sitesRouter } from './sites/routes';
import { noopSyncHooks, type SyncHooks } from './sync/hooks';
import { syncRouter } from './sync/routes';
import { photosRouter } from './uploads/routes';
import { makePhotoStore } from './uploads/make-store';
import type { PhotoStore } from './uploads/store';
import { inlineScriptHashes, webDistPresent, webRouter } from './web';
import { adminRouter } from './admin/routes';

export interface CreateAppOptions {
  config: Config;
  dataSource: DataSource;
  logger?: Logger;
  /** Photo bytes; default: the store PHOTO_STORE names (server/uploads/store.ts). */
  photoStore?: PhotoStore;
  /** Called after a push commits (server/sync/hooks.ts); default: nothing. */
  syncHooks?: SyncHooks;
  /** Told of opened and assigned work orders and stored findings (server/notify.ts); default: nobody. */
  notifier?: Notifier;
  /** Serve GET /api/dev/mailbox (what the SMTP fake received); default: when SMTP_FAKE_PORT is set. */
  devMailbox?: boolean;
}

export const JSON_BODY_LIMIT = '1mb';

/**
 * Content Security Policy that still lets the exported Expo web app run: scripts from our own
 * origin plus the build's inline scripts by hash, WebAssembly compilation ('wasm-unsafe-eval',
 * CSP Level 3) for the SQLite worker, blob: workers, data:/blob: images (photos before upload),
 * inline styles (react-native-web writes its style sheet at run time).
 */
function csp(scriptHashes: string[]) {
  return {
    useDefaults: false,
    directives: {
      defaultSrc: ["'self'"],
      baseUri: ["'self'"],
      objectSrc: ["'none'"],
      frameAncestors: ["'none'"],
      formAction: ["'self'"],
      scriptSrc: ["'self'", "'wasm-unsafe-eval'", ...scriptHashes],
      scriptSrcAttr: ["'none'"],
      workerSrc: ["'self'", 'blob:'],
      imgSrc: ["'self'", 'data:', 'blob:'],
      mediaSrc: ["'self'", 'blob:'],
      fontSrc: ["'self'", 'data:'],
      styleSrc: ["'self'", "'unsafe-inline'"],
      connectSrc: ["'self'", 'blob:', 'data:'],
      manifestSrc: ["'self'"],
    },
  };
}

export function createApp({
  config,
  dataSource,
  logger = makeLogger(config),
  photoStore = makePhotoStore(config),
  syncHooks = noopSyncHooks,
  notifier,
  devMailbox = config.SMTP_FAKE_PORT !== undefined,
}: CreateAppOptions): Express {
  const app = express();
  const deps: Deps = { config, dataSource, logger, notify: notifier };
  app.locals.deps = deps;
  app.set('trust proxy', config.TRUST_PROXY);
  app.disable('x-powered-by');

  const webDir = webDistPresent(config.WEB_DIST) ? config.WEB_DIST : undefined;
  if (config.WEB_DIST && !webDir)
    logger.warn({ WEB_DIST: config.WEB_DIST }, 'WEB_DIST has no index.html; not serving the web app');

  app.use(httpLogger(logger));
  app.use(
    helmet({
      contentSecurityPolicy: csp(webDir ? inlineScriptHashes(webDir) : []),
      // Cross-origin isolation, which expo-sqlite's web worker needs (SharedArrayBuffer).
      crossOriginOpenerPolicy: { policy: 'same-origin' },
      crossOriginEmbedderPolicy: { policy: 'require-corp' },
      crossOriginResourcePolicy: { policy: 'same-origin' },
      // HSTS only where the server is meant to sit behind HTTPS.
      strictTransportSecurity: config.NODE_ENV === 'production',
    }),
  );
  // CORS-mode fetches are not subject to Cross-Origin-Resource-Policy (Fetch standard), so
  // the listed dev origins can read API responses although CORP stays same-origin.
  if (config.CORS_ORIGINS.length) app.use(cors(config.CORS_ORIGINS));
  app.use(express.json({ limit: JSON_BODY_LIMIT }));
  app.use('/api', refuseUnstorableText);

  app.get('/api/health', async (_req, res) => {
    try {
      await dataSource.query('select 1');
    } catch (err) {
      logger.warn({ err }, 'health check: database unreachable');
      throw new AppError(503, 'db_unavailable', 'Database is unreachable');
    }
    res.json({ status: 'ok', db: 'ok' });
  });
  app.use('/api/auth', authRouter(config));
  app.use('/api/me', meRouter());
  app.use('/api/sites', sitesRouter());
  app.use(
    '/api/sites',
    workOrdersRouter(),
    instrumentsRouter(),
    analysisRouter(),
    roundsRouter(),
    exportsRouter(),
    adminRouter(),
  );
  app.use('/api/sync', syncRouter(syncHooks));
  app.use('/api/photos', photosRouter(config, photoStore));
  app.use('/api/dev', devRouter(devMailbox));
  app.use('/api', apiNotFound);

  if (webDir) app.use(webRouter(webDir));
  app.use((req, _res, next) => next(new AppError(404, 'not_found', `Nothing at ${req.method} ${req.path}`)));
  app.use(errorMiddleware);
  return app;
}
