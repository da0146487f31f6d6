/**
 * Security basics: security headers (helmet, with a content security policy that allows scripts and
 * styles from this server only — page scripts are files, never inline), refusal of requests addressed to a
 * host name this server does not answer to (Host check, against DNS rebinding), refusal of state-changing
 * requests sent by pages of other sites (Origin check), and a rate limit that compute and form routes
 * switch on with `config: { rateLimit: computeRateLimit }` (or `formRateLimit`).
 */
import fp from 'fastify-plugin';
import helmet from '@fastify/helmet';
import rateLimit from '@fastify/rate-limit';

declare module 'fastify' {
  interface FastifyContextConfig {
    /** What a rate-limited route counts, in the 429 message ("evaluations" when not given). */
    rateLimitWhat?: string;
  }
}

export interface SecurityOptions {
  /** Evaluations (and other compute requests) per client per minute. */
  computePerMinute: number;
  /**
   * Host names (or IP addresses) besides the loopback names that requests may be addressed to (the
   * operator's ALLOWED_HOSTS, and the HOST the server listens on when it is a specific address).
   */
  allowedHosts?: readonly string[];
}

/** Names a loopback server always answers to. */
export const LOOPBACK_HOSTS = ['127.0.0.1', 'localhost', '::1'] as const;

/**
 * The host name of a Host header, lower case, without port or IPv6 brackets; undefined when it is not a
 * plain host[:port].
 */
export function hostName(header: string | undefined): string | undefined {
  if (!header) return undefined;
  const h = header.trim().toLowerCase();
  const m = /^\[([0-9a-f:.]+)\](?::\d{1,5})?$/.exec(h) ?? /^([a-z0-9._-]+)(?::\d{1,5})?$/.exec(h);
  return m ? m[1].replace(/\.$/, '') : undefined;
}

/** Normalises an operator's list entry as hostName does (so "[::1]" and "Example.org." match). */
export function normaliseHost(entry: string): string | undefined {
  const e = entry.trim();
  if (e === '') return undefined;
  return hostName(e.startsWith('[') || !e.includes(':') || e.split(':').length === 2 ? e : `[${e}]`);
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
    // DNS rebinding: a page on another site whose name is made to resolve to this machine sends its own name
    // as Host (and as Origin, so the Origin check below passes). Answering only to known names stops it.
    const allowed = new Set<string>([...LOOPBACK_HOSTS, ...(opts.allowedHosts ?? []).map(normaliseHost).filter((h): h is string => !!h)]);
    app.addHook('onRequest', async (req) => {
      const name = hostName(req.headers.host);
      if (name === undefined || !allowed.has(name)) {
        throw Object.assign(
          new Error(
            `This server does not answer to the host name ${JSON.stringify(req.headers.host ?? '')}. It answers to ${[...allowed].join(', ')}; ` +
              'the operator adds names with the ALLOWED_HOSTS setting.',
          ),
          { statusCode: 421, code: 'UNKNOWN_HOST' },
        );
      }
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
      errorResponseBuilder: (req, ctx) =>
        Object.assign(
          new Error(
            `Too many ${(req.routeOptions.config as { rateLimitWhat?: string }).rateLimitWhat ?? 'evaluations'} from this client: ` +
              `at most ${ctx.max} per minute. Try again in ${Math.ceil(ctx.ttl / 1000)} s.`,
          ),
          { statusCode: 429, code: 'RATE_LIMITED' },
        ),
    });
  },
  { name: 'security' },
);
