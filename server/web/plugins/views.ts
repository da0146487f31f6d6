/**
 * Server-rendered pages: handlebars templates from templates/ (layouts/, partials/, pages/) through
 * @fastify/view, and `reply.page(name, data, status)` to render a page inside the main layout.
 * Templates only print what view-models prepared; the few helpers here compare and join, nothing more.
 */
import fp from 'fastify-plugin';
import fastifyView from '@fastify/view';
import Handlebars from 'handlebars';
import { readdirSync } from 'node:fs';
import { basename, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { TOOL } from '../../version.ts';

export const TEMPLATES_DIR = fileURLToPath(new URL('../../../templates/', import.meta.url));

declare module 'fastify' {
  interface FastifyReply {
    /** Renders templates/pages/<name>.hbs in the main layout and sends it as HTML. */
    page(name: string, data: Record<string, unknown>, status?: number): Promise<FastifyReply>;
  }
}

function makeHandlebars(): typeof Handlebars {
  const hbs = Handlebars.create();
  hbs.registerHelper('eq', (a: unknown, b: unknown) => a === b);
  hbs.registerHelper('not', (a: unknown) => !a);
  hbs.registerHelper('or', (...args: unknown[]) => args.slice(0, -1).some(Boolean));
  hbs.registerHelper('and', (...args: unknown[]) => args.slice(0, -1).every(Boolean));
  hbs.registerHelper('inc', (a: unknown) => Number(a) + 1);
  return hbs;
}

export default fp(
  async (app, opts: { production?: boolean }) => {
    const partials: Record<string, string> = {};
    for (const f of readdirSync(join(TEMPLATES_DIR, 'partials')).filter((f) => f.endsWith('.hbs'))) {
      partials[basename(f, '.hbs')] = `partials/${f}`;
    }
    await app.register(fastifyView, {
      engine: { handlebars: makeHandlebars() },
      root: TEMPLATES_DIR,
      layout: 'layouts/main.hbs',
      viewExt: 'hbs',
      production: opts.production ?? true,
      options: { partials },
      defaultContext: { tool: TOOL },
    });
    app.decorateReply('page', async function (this, name: string, data: Record<string, unknown>, status = 200) {
      const html = await this.viewAsync(`pages/${name}`, data);
      return this.code(status).type('text/html; charset=utf-8').send(html);
    });
  },
  { name: 'views' },
);
