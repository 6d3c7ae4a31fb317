/**
 * The HTTP service: `createApp(config, deps)` builds the Express app — security headers, request
 * logs, access control, JSON body limit, the routes, the 404 and the one error middleware — and
 * returns it without listening. Nothing is kept at module level: two apps built in one process
 * share nothing.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { interpret } from '../lib/interpret.js';
import { accessControl } from './auth.js';
import { sameOrigin } from './same-origin.js';
import { parseConfig, type ServerConfig, type ServerConfigInput } from './config.js';
import { ApiError, errorMiddleware, unknownRoute, type ErrorTranslator } from './errors.js';
import { createLogger, requestLogger, stderrSink, type LogSink } from './logging.js';
import type { RouteContext } from './routes/context.js';
import { clientRoutes } from './routes/client-pages.js';
import { healthRoutes } from './routes/health.js';
import { serviceIndexRoutes } from './routes/service-index.js';
import { interpretationRoutes } from './routes/interpretations.js';
import { pickRoutes } from './routes/picks.js';
import { gatherRoutes } from './routes/gathers.js';
import { surveyRoutes } from './routes/surveys.js';
import { openDatabase } from './storage/database.js';
import { createSurveyStore, type SurveyStore } from './storage/survey-store.js';
import { softwareVersion } from './version.js';

/** The database file inside `dataDir` (a fixed name: no request value ever becomes a path). */
export const DATABASE_FILE_NAME = 'slopebreak.sqlite';

/** What the app is built on; each has a default, tests replace them. */
export interface AppDeps {
  /** The survey store; default a store over `<dataDir>/slopebreak.sqlite` (folder created if missing). */
  readonly store?: SurveyStore;
  /** Where log lines go; default standard error. */
  readonly logSink?: LogSink;
  /** The interpretation pipeline; default `interpret` from lib/. */
  readonly interpret?: typeof interpret;
  /** The clock of the log lines. */
  readonly now?: () => Date;
  /** Extra error translations tried before the built-in ones. */
  readonly errorTranslators?: readonly ErrorTranslator[];
}

function defaultStore(config: ServerConfig): SurveyStore {
  mkdirSync(config.dataDir, { recursive: true });
  return createSurveyStore(openDatabase(join(config.dataDir, DATABASE_FILE_NAME)));
}

/** Routes that take a file (CSV or multipart) rather than a JSON body. */
const UPLOAD_ROUTES = [/^\/api\/surveys\/[^/]+\/picks\/?$/, /^\/api\/interpret\/?$/];

/**
 * A write that carries a body which is not JSON, on a route that takes JSON, is refused with 415
 * instead of being read as "no options" (a form-encoded body would otherwise run with defaults).
 */
const jsonBodiesOnly: express.RequestHandler = (request, _response, next) => {
  const hasBody = Number(request.get('content-length') ?? 0) > 0 || request.get('transfer-encoding') !== undefined;
  if (!hasBody || request.method === 'GET' || request.method === 'HEAD' || UPLOAD_ROUTES.some((route) => route.test(request.path))) {
    next();
    return;
  }
  if (request.is('application/json')) {
    next();
    return;
  }
  next(
    new ApiError({
      code: 'body-not-json', status: 415,
      message: `this route takes a JSON body, but the request sent ${request.get('content-type') ?? 'no content type'}; nothing was stored`,
      fix: 'send the body as JSON with Content-Type: application/json',
    }),
  );
};

export function createApp(configInput: ServerConfigInput, deps: AppDeps = {}): Express {
  const config = parseConfig(configInput);
  const logger = createLogger(deps.logSink ?? stderrSink, deps.now);
  const context: RouteContext = {
    config,
    store: deps.store ?? defaultStore(config),
    interpret: deps.interpret ?? interpret,
    softwareVersion: softwareVersion(),
  };

  const app = express();
  app.disable('x-powered-by');
  app.set('etag', false); // survey ETags are versions, set by the routes
  app.set('query parser', 'simple');
  // Security headers, less the two that assume HTTPS: the service runs over plain HTTP on an
  // office network, where `upgrade-insecure-requests` would send the browser to an https:// that
  // is not there, and HSTS means nothing.
  // The client's plots make their PNG exports through blob: images, hence `img-src blob:`.
  app.use(helmet({
    strictTransportSecurity: false,
    // Styles from this server only; inline styles stay allowed because plotly writes its own.
    contentSecurityPolicy: { directives: { upgradeInsecureRequests: null, imgSrc: ["'self'", 'data:', 'blob:'], styleSrc: ["'self'", "'unsafe-inline'"] } },
  }));
  app.use(requestLogger(logger));
  app.use(sameOrigin(config.allowedHostNames));
  // The client's pages and files hold no survey data: served before the access check, so a locked
  // server still shows its page, which then asks for the token.
  app.use(clientRoutes(context));
  app.use(accessControl(config));
  app.use(express.json({ limit: config.jsonBodyLimit }));
  app.use(jsonBodiesOnly);

  app.use(healthRoutes(context));
  app.use(serviceIndexRoutes(context));
  app.use(surveyRoutes(context));
  app.use(pickRoutes(context));
  app.use(gatherRoutes(context));
  app.use(interpretationRoutes(context));

  app.use(unknownRoute);
  app.use(errorMiddleware({ ...config, logger, translators: deps.errorTranslators ?? [] }));
  return app;
}
