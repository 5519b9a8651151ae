import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { auditTrail } from './admin/audit-trail.js';
import { authKit } from './auth/auth-kit.js';
import { csrfProtection } from './auth/csrf.js';
import type { AppContext } from './context.js';
import { clientFiles } from './http/client-files.js';
import { errorHandler } from './http/error-handler.js';
import { notFound } from './http/http-error.js';
import { requestLog } from './http/request-log.js';
import { apiRoutes } from './routes/index.js';
import { bearerAuth } from './tokens/bearer-auth.js';

/** JSON bodies are small (parameters, names); recordings go through the streaming upload route. */
const JSON_LIMIT = '1mb';

/** Builds the Express app for one context. Listening is main.ts's business (tests reuse this). */
export function createApp(ctx: AppContext): Express {
  const { config } = ctx;
  const auth = authKit(ctx);
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);

  app.use(helmet(securityHeaders(config.cookieSecure === true)));
  app.use(requestLog(ctx.logger));
  app.use(cookieParser());

  // Sessions and passport only under /api: static files need no database round trip.
  app.use('/api', express.json({ limit: JSON_LIMIT }), auth.session, auth.passport.initialize(), auth.passport.session());
  // Personal API tokens (Authorization: Bearer) replace the session user; then the audit trail.
  app.use('/api', bearerAuth(ctx), auditTrail(ctx));
  app.use(csrfProtection(config.cookieSecure));
  for (const { path, router } of apiRoutes(ctx)) app.use(path, router);
  app.use('/api', (req, _res, next) => {
    next(notFound(`There is no API endpoint ${req.method} ${req.originalUrl.split('?')[0]}. Check the path against the API list in README.md.`));
  });

  app.use(clientFiles());
  app.use(errorHandler(ctx.logger));
  return app;
}

/**
 * helmet's defaults plus a Content-Security-Policy fitted to the Angular bundle: scripts only
 * from us; styles from us plus inline <style> (Angular injects component styles at run time);
 * fonts are bundled; fetch and WebSocket only to our own origin ('self' covers ws/wss on the
 * same host in CSP Level 3 browsers); no framing.
 */
function securityHeaders(httpsOnly: boolean): Parameters<typeof helmet>[0] {
  return {
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        scriptSrcAttr: ["'none'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        fontSrc: ["'self'", 'data:'],
        imgSrc: ["'self'", 'data:', 'blob:'],
        connectSrc: ["'self'"],
        workerSrc: ["'self'", 'blob:'],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
        ...(httpsOnly ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    // HSTS only when the deployment says it is HTTPS-only; on plain-HTTP lab networks it would lock browsers out.
    strictTransportSecurity: httpsOnly,
    crossOriginEmbedderPolicy: false,
    xFrameOptions: { action: 'deny' },
  };
}
