import fs from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { Router } from 'express';
import helmet from 'helmet';
import type { AppContext } from './context.js';
import { errorHandler, notFoundHandler } from './core/error-handler.js';
import { requestLogging } from './core/logging.js';
import { ReadCache } from './core/read-cache.js';
import { mountRoutes, type MountedRoute, type RouteDef } from './core/routes.js';
import { csrfProtection } from './auth/csrf.js';
import { loadSession } from './auth/session.js';
import { authRoutes } from './auth/auth-router.js';
import { usersRoutes } from './users/users-router.js';
import { farmsRoutes } from './farms/farms-router.js';
import { settingsRoutes } from './settings/settings-router.js';
import { summaryRoutes } from './summary/summary-router.js';
import { auditRoutes } from './audit/audit-router.js';
import { devMailRoutes } from './mail/dev-mail-router.js';
import { importsRoutes } from './imports/imports-router.js';
import { deliveryPointsRoutes, farmWriteRoutes, itemsRoutes, seasonsRoutes } from './reference/reference-router.js';
import { priceIndexRoutes, pricesRoutes } from './prices/prices-router.js';
import { recordsRoutes } from './records/records-router.js';
import { contractsRoutes } from './contracts/contracts-router.js';
import { modelRunsRoutes, modelsRoutes } from './models/models-router.js';
import { budgetsRoutes, fertiliserProductsRoutes } from './budget/budgets-router.js';
import { outlookRoutes } from './outlook/outlook-router.js';
import { futuresRoutes } from './outlook/futures-router.js';
import { portalRoutes } from './outlook/portal-router.js';
import { accountMailRoutes, unsubscribeRoutes } from './outlook/account-router.js';
import { bookingsRoutes, devPaymentsRoutes, paymentsRoutes } from './bookings/bookings-router.js';
import { VERSION } from './version.js';

export interface NetputApp extends express.Express {
  /** Every API route with its access rule, as mounted. */
  routeTable: MountedRoute[];
  /** In-memory answers of the cacheable read routes (PGlite mode only). */
  readCache: ReadCache | null;
}

/** Builds the Express app around a context; only main.ts listens. */
export function createApp(ctx: AppContext): NetputApp {
  const app = express() as NetputApp;
  const table: MountedRoute[] = [];
  app.routeTable = table;
  app.disable('x-powered-by');
  app.set('trust proxy', process.env.TRUST_PROXY ?? 'loopback');

  app.use(requestLogging(ctx.config.logLevel, ctx.logDestination));
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Angular's production build has no inline scripts; AG Grid's theming injects <style>.
          scriptSrc: ["'self'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          frameSrc: ["'self'"],
          upgradeInsecureRequests: ctx.config.secureCookies ? [] : null,
        },
      },
      strictTransportSecurity: ctx.config.secureCookies,
    }),
  );

  const api = Router();
  // Webhook signatures are computed over the exact bytes sent: that route keeps its raw body.
  api.use('/payments/webhook', express.raw({ type: () => true, limit: '256kb' }));
  api.use(express.json({ limit: '1mb' }));
  api.use(cookieParser());
  api.use(loadSession(ctx.db, ctx.changes ?? null));
  api.use(csrfProtection(ctx.db, ctx.config.secureCookies));

  const readCache = ctx.changes ? new ReadCache(ctx.changes) : null;
  app.readCache = readCache;
  const cacheMiddleware = readCache?.middleware();
  const mount = (prefix: string, defs: RouteDef[]) => {
    const router = Router();
    mountRoutes(
      router,
      `/api${prefix}`,
      defs.filter((d) => !d.devOnly || ctx.config.dev),
      table,
      cacheMiddleware,
    );
    api.use(prefix, router);
  };
  mount('', [
    {
      method: 'get',
      path: '/health',
      access: 'public',
      handler: (_req, res) => res.json({ status: 'ok', version: VERSION, database: ctx.dbKind }),
    },
    ...farmsRoutes(ctx),
  ]);
  mount('/auth', authRoutes(ctx));
  mount('/users', usersRoutes(ctx));
  mount('/settings', settingsRoutes(ctx));
  mount('/summary', summaryRoutes(ctx));
  mount('/audit', auditRoutes(ctx));
  mount('/items', itemsRoutes(ctx));
  mount('/seasons', seasonsRoutes(ctx));
  mount('/delivery-points', deliveryPointsRoutes(ctx));
  mount('/farms', farmWriteRoutes(ctx));
  mount('/prices', pricesRoutes(ctx));
  mount('/price-indexes', priceIndexRoutes(ctx));
  mount('/records', recordsRoutes(ctx));
  mount('/contracts', contractsRoutes(ctx));
  mount('/imports', importsRoutes(ctx));
  mount('/models', modelsRoutes(ctx));
  mount('/model-runs', modelRunsRoutes(ctx));
  mount('/budgets', budgetsRoutes(ctx));
  mount('/fertiliser-products', fertiliserProductsRoutes(ctx));
  mount('/outlooks', outlookRoutes(ctx));
  mount('/futures-quotes', futuresRoutes(ctx));
  mount('/portal', portalRoutes(ctx));
  mount('/account', accountMailRoutes(ctx));
  // The unsubscribe page's button and RFC 8058's one-click POST send a form, not JSON.
  api.use('/unsubscribe', express.urlencoded({ extended: false, limit: '2kb' }));
  mount('/unsubscribe', unsubscribeRoutes(ctx));
  mount('/dev/mail', devMailRoutes(ctx));
  mount('/bookings', bookingsRoutes(ctx));
  mount('/payments', paymentsRoutes(ctx));
  mount('/dev/payments', devPaymentsRoutes(ctx));
  api.use(notFoundHandler);
  api.use(errorHandler);
  app.use('/api', api);

  // The built Angular app, with the SPA fallback for client routes.
  const index = path.join(ctx.config.appDir, 'index.html');
  if (fs.existsSync(index)) {
    app.use(express.static(ctx.config.appDir, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(index);
    });
  }
  app.use(errorHandler);
  return app;
}
