/**
 * Security basics: security headers (helmet, with a content security policy that allows scripts and
 * styles from this server only — page scripts are files, never inline), refusal of state-changing requests
 * sent by pages of other sites (Origin check), and a rate limit that compute routes switch on with
 * `config: { rateLimit: computeRateLimit }`.
 */
import fp from 'fastify-plugin';
import helmet from '@fastify/helmet';
import rateLimit from '@fastify/rate-limit';

export interface SecurityOptions {
  /** Evaluations (and other compute requests) per client per minute. */
  computePerMinute: number;
}

export default fp(
  async (app, opts: SecurityOptions) => {
    await app.register(helmet, {
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          'script-src': ["'self'"],
          'script-src-attr': ["'none'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'form-action': ["'self'"],
          'frame-ancestors': ["'none'"],
          'object-src': ["'none'"],
          'base-uri': ["'self'"],
          // The app is usually served over plain http on a workstation: do not ask browsers to upgrade.
          'upgrade-insecure-requests': null,
        },
      },
      // Pages are served over http on 127.0.0.1 by default; HSTS would pin a name to https.
      strictTransportSecurity: false,
      // Browsers send the page's origin with form posts to this server only (with "no-referrer" they send
      // "null", which the Origin check below could not tell from a foreign page); nothing leaves for other sites.
      referrerPolicy: { policy: 'same-origin' },
    });
    // Requests that change something must come from this app's own pages (or from a script, which sends no
    // Origin): a page on another site cannot make a visitor's browser delete or run scenarios here.
    app.addHook('onRequest', async (req) => {
      if (req.method === 'GET' || req.method === 'HEAD' || req.method === 'OPTIONS') return;
      const origin = req.headers.origin;
      if (origin === undefined) return;
      // Compare as URLs so that default ports (":80") do not make the same host look different.
      const hostOf = (u: string) => {
        try {
          return new URL(u).host;
        } catch {
          return undefined;
        }
      };
      const from = hostOf(origin);
      if (from === undefined || from !== hostOf(`http://${req.headers.host ?? ''}`)) {
        throw Object.assign(new Error('This request came from another site and was refused.'), { statusCode: 403, code: 'CROSS_SITE' });
      }
    });
    await app.register(rateLimit, {
      global: false,
      max: opts.computePerMinute,
      timeWindow: '1 minute',
      // Thrown as an error, so the one error handler answers it (page or JSON).
      errorResponseBuilder: (_req, ctx) =>
        Object.assign(
          new Error(`Too many evaluations from this client: at most ${ctx.max} per minute. Try again in ${Math.ceil(ctx.ttl / 1000)} s.`),
          { statusCode: 429, code: 'RATE_LIMITED' },
        ),
    });
  },
  { name: 'security' },
);
