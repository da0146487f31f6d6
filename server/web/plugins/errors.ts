/**
 * The one error handler and the not-found handler. Input errors (InputError and its kinds) answer 400
 * with every problem's field path, value and allowed range; client errors keep their status and plain
 * message; anything else is logged with a reference and answered with a generic message — never a
 * stack trace. API routes (/api/...) answer JSON, pages answer HTML.
 */
import fp from 'fastify-plugin';
import { randomUUID } from 'node:crypto';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { InputError, jsonSafeValue, type Problem } from '../../model/errors.ts';
import { problemItems } from '../view-models/problems.ts';

export interface ErrorBody {
  error: string;
  message: string;
  problems: Problem[];
  /** Reference of a server-side failure in the server log. */
  reference?: string;
}

export const isApiRequest = (req: FastifyRequest) => {
  const url = req.url ?? req.raw.url ?? '';
  return url.startsWith('/api/') || url === '/api';
};

const HTTP_TITLES: Record<number, string> = {
  400: 'The input needs correcting',
  403: 'Refused',
  404: 'Not found',
  405: 'Not allowed',
  406: 'Not acceptable',
  409: 'Not possible',
  413: 'Too large',
  414: 'Address too long',
  415: 'Unsupported content',
  421: 'Unknown host name',
  422: 'Cannot be drawn',
  429: 'Too many requests',
  500: 'Something went wrong on our side',
  503: 'Busy',
  507: 'No room to store it',
};

async function send(req: FastifyRequest, reply: FastifyReply, status: number, body: ErrorBody) {
  if (isApiRequest(req) || reply.sent) {
    const problems = body.problems.map((p) => ({ ...p, value: jsonSafeValue(p.value) }));
    return reply.code(status).type('application/json; charset=utf-8').send({ ...body, problems });
  }
  try {
    return await reply.page('error', { title: HTTP_TITLES[status] ?? 'Error', status, ...body, problems: problemItems(body.problems) }, status);
  } catch (err) {
    req.log.error({ err }, 'error page could not be rendered');
    return reply.code(status).type('text/plain; charset=utf-8').send(`${HTTP_TITLES[status] ?? 'Error'}: ${body.message}`);
  }
}

export default fp(
  async (app) => {
    app.setErrorHandler(async (err: unknown, req, reply) => {
      if (err instanceof InputError) {
        const n = err.problems.length;
        // An input error may carry 503 (a full queue: retry later), 413 (a form with more inputs than any of this
        // app's), 422 (valid, but a briefing cannot draw its text) or 507 (no room left to store it); anything
        // else is the input's fault.
        const carried = (err as { statusCode?: number }).statusCode;
        const status = carried === 503 || carried === 413 || carried === 422 || carried === 507 ? carried : 400;
        if (status === 503) reply.header('retry-after', '60');
        return send(req, reply, status, {
          error: err.code,
          message: `${n} problem${n === 1 ? '' : 's'} found: ${err.problems.map((p) => `${p.path || '(input)'}: ${p.message}`).join('; ')}`,
          problems: err.problems,
        });
      }
      const e = (err ?? {}) as { statusCode?: number; code?: string; message?: string };
      const status = typeof e.statusCode === 'number' ? e.statusCode : 500;
      if (status >= 400 && status < 500) {
        return send(req, reply, status, { error: e.code ?? 'BAD_REQUEST', message: e.message ?? 'Bad request', problems: [] });
      }
      const reference = randomUUID().slice(0, 8);
      req.log.error({ err, reference }, 'request failed');
      return send(req, reply, 500, {
        error: 'INTERNAL',
        message: `The server could not complete this request. The details were logged under reference ${reference}.`,
        problems: [],
        reference,
      });
    });
    app.setNotFoundHandler(async (req, reply) =>
      send(req, reply, 404, { error: 'NOT_FOUND', message: `There is nothing at ${req.method} ${req.url.split('?')[0]}.`, problems: [] }),
    );
  },
  { name: 'errors', dependencies: ['views'] },
);

/**
 * Errors the router answers before any route or hook runs (a malformed %-escape, a reference longer than the
 * router allows): passed to Fastify as `frameworkErrors`, so they get the same JSON body or error page as
 * every other error.
 */
export async function frameworkErrors(
  err: { code?: string },
  req: FastifyRequest,
  reply: FastifyReply,
  /** Renders a page template in the layout (the router's reply has no `page`). */
  render?: (name: string, data: Record<string, unknown>) => Promise<string>,
) {
  const tooLong = err.code === 'FST_ERR_MAX_PARAM_LENGTH';
  const status = tooLong ? 414 : 400;
  const message = tooLong
    ? 'The address is too long: a scenario, result or run reference has at most 80 characters.'
    : 'This is not a valid address: it has a "%" that does not start a valid %-escape.';
  const url = req.raw.url ?? '';
  const body: ErrorBody = {
    error: tooLong ? 'URL_TOO_LONG' : 'BAD_URL',
    message,
    problems: [{ path: 'url', value: url.length > 120 ? `${url.slice(0, 117)}...` : url, message: tooLong ? 'must have references of at most 80 characters' : 'must be a valid address' }],
  };
  if (!isApiRequest(req) && render) {
    try {
      const html = await render('pages/error', { title: HTTP_TITLES[status], status, ...body, problems: problemItems(body.problems) });
      return reply.code(status).type('text/html; charset=utf-8').send(html);
    } catch (e) {
      req.log.error({ err: e }, 'error page could not be rendered');
    }
  }
  return send(req, reply, status, body);
}

/** A 404 for a missing scenario, result or job, thrown from route handlers. */
export function notFound(what: string): Error {
  return Object.assign(new Error(`${what} was not found. It may have been deleted.`), { statusCode: 404, code: 'NOT_FOUND' });
}

/** A 409 for an action that does not fit the current state (e.g. editing a demo scenario through the API). */
export function conflict(message: string): Error {
  return Object.assign(new Error(message), { statusCode: 409, code: 'CONFLICT' });
}
