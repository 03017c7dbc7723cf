import fs from 'node:fs';
import path from 'node:path';
import compression from 'compression';
import express, { Router, type Express } from 'express';
import expressStaticGzip from 'express-static-gzip';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { csrfProtection, installSessions } from './auth/session.js';
import type { Deps } from './deps.js';
import { registerAuthRoutes } from './features/auth/auth.routes.js';
import { registerHealthRoutes } from './features/health/health.routes.js';
import { registerCompareRoutes } from './features/compare/compare.routes.js';
import { reviewLock } from './features/compare/review-lock.js';
import { registerConsentRoutes } from './features/consents/consents.routes.js';
import { registerHandoverRoutes } from './features/consents/handover.routes.js';
import { registerTemplateRoutes } from './features/consents/templates.routes.js';
import { registerOutboxRoutes } from './features/outbox/outbox.routes.js';
import { registerAccessLogRoutes } from './features/access-log/access-log.routes.js';
import { registerPatientDataRoutes } from './features/patient-data/patient-data.routes.js';
import { registerShowcaseRoutes } from './features/showcase/showcase.routes.js';
import { registerStockRoutes } from './features/stock/stock.routes.js';
import { registerComplicationRoutes } from './features/complications/complications.routes.js';
import { registerSettingsRoutes } from './features/settings/settings.routes.js';
import { registerPatientRoutes } from './features/patients/patients.routes.js';
import { registerLandmarkRoutes } from './features/landmarks/landmarks.routes.js';
import { registerPhotoRoutes } from './features/photos/photos.routes.js';
import { registerClinicDayRoutes } from './features/clinic-day/clinic-day.routes.js';
import { registerReminderRoutes } from './features/reminders/reminders.routes.js';
import { registerProductRoutes } from './features/treatments/products.routes.js';
import { registerReferencePictureRoutes } from './features/treatments/reference-pictures.routes.js';
import { registerTreatmentRoutes } from './features/treatments/treatments.routes.js';
import { registerUserRoutes } from './features/users/users.routes.js';
import { registerVisitRoutes } from './features/visits/visits.routes.js';
import { registerVerifyRoutes } from './features/verify/verify.routes.js';
import { registerIntegrityRoutes } from './features/integrity/integrity.routes.js';
import { errorHandler } from './lib/error-handler.js';
import { HttpError } from './lib/errors.js';

/**
 * Every API route, registered with its full path on one router so the role-matrix test can list them all.
 * Each feature adds its routes through one `register…Routes` function.
 */
export function buildApiRouter(deps: Deps): Router {
  const r = Router();
  registerHealthRoutes(r, deps);
  registerAuthRoutes(r, deps);
  registerUserRoutes(r, deps);
  registerPatientRoutes(r, deps);
  registerVisitRoutes(r, deps);
  registerPhotoRoutes(r, deps);
  registerLandmarkRoutes(r, deps);
  registerCompareRoutes(r, deps);
  registerOutboxRoutes(r, deps);
  registerTemplateRoutes(r, deps);
  registerProductRoutes(r, deps);
  registerTreatmentRoutes(r, deps);
  registerStockRoutes(r, deps);
  registerComplicationRoutes(r, deps);
  registerReferencePictureRoutes(r, deps);
  registerReminderRoutes(r, deps);
  registerClinicDayRoutes(r, deps);
  registerSettingsRoutes(r, deps);
  registerAccessLogRoutes(r, deps);
  registerPatientDataRoutes(r, deps);
  registerShowcaseRoutes(r, deps);
  registerHandoverRoutes(r, deps);
  registerConsentRoutes(r, deps);
  registerVerifyRoutes(r, deps);
  registerIntegrityRoutes(r, deps);
  return r;
}

/** The Express app without `listen()`, so tests can drive it with supertest. */
export function createApp(deps: Deps, opts: { staticDir?: string } = {}): Express & { apiRouter: Router } {
  const app = express();
  app.set('trust proxy', deps.config.trustProxy);
  app.disable('x-powered-by');
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          baseUri: ["'self'"],
          // Compiling WebAssembly (the label-code reader) needs 'wasm-unsafe-eval'; scripts still come only from this origin.
          scriptSrc: ["'self'", "'wasm-unsafe-eval'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          fontSrc: ["'self'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          mediaSrc: ["'self'", 'blob:'],
          connectSrc: ["'self'"],
          workerSrc: ["'self'", 'blob:'],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          formAction: ["'self'"],
        },
      },
    }),
  );
  app.use(
    pinoHttp({
      logger: deps.logger,
      // Only method, path and status: never bodies, cookies, tokens or photo bytes.
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      autoLogging: { ignore: (req) => !req.url?.startsWith('/api/') },
    }),
  );
  // Brotli or gzip, as the browser accepts, for JSON, CSV and HTML answers (brotli at quality 4: a fraction of gzip's
  // time at a smaller size, fit for answers made on the fly). Photos and PDFs are compressed already and pass as they
  // are; built assets come precompressed (below).
  app.use(compression());
  app.use('/api', (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', express.json({ limit: '256kb' }));
  app.locals.passport = installSessions(app, deps.db, deps.config, deps.mailer);
  app.use('/api', csrfProtection);
  // Review mode confines the whole API to one patient until staff confirm leaving it.
  app.use('/api', reviewLock(deps.db));

  const apiRouter = buildApiRouter(deps);
  app.use(apiRouter);
  app.use('/api', (req, _res, next) => next(new HttpError(404, 'NOT_FOUND', `No API route ${req.method} ${req.originalUrl}.`)));

  const staticDir = opts.staticDir;
  if (staticDir && fs.existsSync(path.join(staticDir, 'index.html'))) {
    // Hashed bundles never change; everything else is revalidated. The build wrote each text asset also as .br and
    // .gz (vite.config.ts): the smallest the browser accepts is sent, with its Content-Encoding and Vary.
    const precompressed = { enableBrotli: true, orderPreference: ['br', 'gzip'], index: false };
    app.use('/assets', expressStaticGzip(path.join(staticDir, 'assets'), { ...precompressed, serveStatic: { maxAge: '1y', immutable: true } }));
    app.use(expressStaticGzip(staticDir, precompressed));
    app.get('/{*splat}', (_req, res) => {
      res.set('Cache-Control', 'no-cache');
      res.sendFile(path.join(staticDir, 'index.html'));
    });
  }
  app.use(errorHandler(deps.logger));
  return Object.assign(app, { apiRouter });
}
