import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import type { Config } from './config';
import type { Database } from './db/client';
import { logger } from './logger';
import { configurePassport } from './auth/session';
import { errorHandler, notFoundApi } from './http/errors';
import { healthRouter } from './routes/health/router';
import { authRouter } from './routes/auth/router';
import { usersRouter } from './routes/users/router';
import { uploadsRouter } from './routes/uploads/router';
import { plantsRouter } from './routes/plants/router';
import { linesRouter } from './routes/lines/router';
import { productsRouter } from './routes/products/router';
import { characteristicsRouter } from './routes/characteristics/router';
import { lotsRouter } from './routes/lots/router';
import { testMethodsRouter } from './routes/test-methods/router';
import { specificationsRouter } from './routes/specifications/router';
import { processEventsRouter } from './routes/process-events/router';
import { measurementsRouter } from './routes/measurements/router';
import { columnMappingsRouter } from './routes/column-mappings/router';
import { chartsRouter } from './routes/charts/router';
import { overviewRouter } from './routes/overview/router';
import { spcRunsRouter } from './routes/spc-runs/router';
import { alarmsRouter } from './routes/alarms/router';
import { alarmGroupsRouter } from './routes/alarm-groups/router';
import { subscriptionsRouter } from './routes/subscriptions/router';
import { devRouter } from './routes/dev/router';
import { mailLogRouter } from './routes/mail-log/router';
import { peopleRouter } from './routes/people/router';
import { ncrsRouter } from './routes/ncrs/router';
import { reportsRouter } from './routes/reports/router';
import { auditPackRouter } from './routes/audit-pack/router';
import { auditCsvRouter, auditEventsRouter } from './routes/audit-events/router';
import { lazyQueue, type SpcQueue } from './spc/queue';
import { resultsChanged as scheduleRun, type ResultsChanged } from './spc/results-changed';
import type { FakeSmtp } from './mail/fake-smtp';
import { mailSettings } from './mail/settings';
import { webDist } from './paths';

export interface AppDeps {
  db: Database;
  config: Pick<Config, 'jwtSecret' | 'loginAttemptsPer15Min'>;
  /** Serve the built web app (off in API-only tests). */
  serveWeb?: boolean;
  /**
   * What follows a change of results, limits or chart settings: out-of-spec alarms and the incremental
   * SPC run. The server passes resultsChanged() on its queue; without it (API tests of other resources)
   * new and withdrawn results start nothing and only chart decisions (limits, settings) start a run.
   */
  resultsChanged?: ResultsChanged;
  /** Queue that SPC runs are started on; by default one on the app's pool, started on first use. */
  spcQueue?: SpcQueue;
  /** The local fake SMTP server when it is in use: its messages are listed under /api/v1/dev/outbox. */
  fakeSmtp?: FakeSmtp | null;
  /** Address of the web app in alarm links. */
  publicUrl?: string;
}

export function createApp({ db, config, serveWeb = true, resultsChanged, spcQueue, fakeSmtp = null, publicUrl = mailSettings().publicUrl }: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: { 'img-src': ["'self'", 'data:', 'blob:'], 'upgrade-insecure-requests': null },
      },
    }),
  );
  app.use(
    pinoHttp({
      logger,
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      // One short line a request: headers and cookies stay out of the log.
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
    }),
  );
  app.use(express.json({ limit: '1mb' }));
  app.use(cookieParser());
  app.use(configurePassport(db, config.jwtSecret).initialize());

  app.use('/api/health', healthRouter(db));
  app.use('/api/v1/auth', authRouter(db, config));
  app.use('/api/v1/users', usersRouter(db));
  const queue = spcQueue ?? lazyQueue(db.$client);
  const changed: ResultsChanged =
    resultsChanged ?? (async (change) => (change.because === 'limits' || change.because === 'settings' ? scheduleRun({ db, queue, publicUrl }, change) : undefined));
  app.use('/api/v1/uploads', uploadsRouter(db, changed));
  app.use('/api/v1/measurements', measurementsRouter(db, changed));
  app.use('/api/v1/column-mappings', columnMappingsRouter(db));
  app.use('/api/v1/characteristics', chartsRouter(db, changed));
  app.use('/api/v1/overview', overviewRouter(db));
  app.use('/api/v1/spc-runs', spcRunsRouter(db, queue));
  app.use('/api/v1/alarms', alarmsRouter(db, publicUrl, changed));
  app.use('/api/v1/alarm-groups', alarmGroupsRouter(db));
  app.use('/api/v1/subscriptions', subscriptionsRouter(db));
  app.use('/api/v1/mail-log', mailLogRouter(db));
  app.use('/api/v1/people', peopleRouter(db));
  app.use('/api/v1/ncrs', ncrsRouter(db, publicUrl));
  app.use('/api/v1/reports', reportsRouter(db));
  app.use('/api/v1/reports', auditPackRouter(db));
  app.use('/api/v1/audit-events', auditEventsRouter(db));
  app.use('/api/v1', auditCsvRouter(db));
  if (fakeSmtp) app.use('/api/v1/dev', devRouter(fakeSmtp));
  app.use('/api/v1/characteristics', specificationsRouter(db));
  app.use('/api/v1/process-events', processEventsRouter(db));
  const chartSettingsChanged = (characteristicId: number, userId: number) => changed({ characteristicIds: [characteristicId], because: 'settings', by: userId });
  app.use('/api/v1/plants', plantsRouter(db));
  app.use('/api/v1/lines', linesRouter(db));
  app.use('/api/v1/products', productsRouter(db));
  // Beside the charts and specifications routers: each answers its own paths under /characteristics.
  app.use('/api/v1/characteristics', characteristicsRouter(db, chartSettingsChanged));
  app.use('/api/v1/lots', lotsRouter(db, publicUrl));
  app.use('/api/v1/test-methods', testMethodsRouter());
  app.use('/api', notFoundApi);

  if (serveWeb && existsSync(webDist)) {
    app.use(express.static(webDist, { index: false, maxAge: '1h' }));
    // Client-side routes: every other GET gets the app shell.
    app.get(/.*/, (_req, res) => res.sendFile(resolve(webDist, 'index.html')));
  }

  app.use(errorHandler);
  return app;
}
