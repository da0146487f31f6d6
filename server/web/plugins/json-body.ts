/**
 * JSON request bodies read by the same reader as scenario files on the CLI, uploads and the JSON editor
 * (model/json-text.ts): a byte-order mark is accepted, a syntax error answers 400 with its line and column,
 * duplicate keys and `__proto__`/`constructor`/`prototype` keys are refused by name and position.
 */
import fp from 'fastify-plugin';
import { parseJsonText } from '../../model/json-text.ts';

export default fp(
  async (app) => {
    app.removeContentTypeParser(['application/json']);
    app.addContentTypeParser(/^application\/([\w.+-]+\+)?json(\s*;.*)?$/i, { parseAs: 'string' }, (_req, body, done) => {
      try {
        done(null, parseJsonText(body as string));
      } catch (err) {
        done(err as Error, undefined);
      }
    });
  },
  { name: 'json-body' },
);
