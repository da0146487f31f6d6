/**
 * zod for request validation and the OpenAPI document: route schemas are the model's zod schemas,
 * @fastify/swagger turns them into OpenAPI 3 (fastify-type-provider-zod), served at /api/openapi.json.
 * A request that fails its schema becomes an InputError whose problems name each field path, the value
 * found and the allowed range — the same wording as the CLI and the form.
 */
import fp from 'fastify-plugin';
import swagger from '@fastify/swagger';
import { jsonSchemaTransform, serializerCompiler } from 'fastify-type-provider-zod';
import type { FastifySchemaCompiler } from 'fastify';
import { safeParse, type $ZodType } from 'zod/v4/core';
import { InputError, ScenarioError, problemsFromZod } from '../../model/errors.ts';
import { ScenarioSchema } from '../../model/scenario.ts';
import { TOOL } from '../../version.ts';

/** Request validation with zod; problems are reported with field paths relative to the part checked. */
export const validatorCompiler: FastifySchemaCompiler<$ZodType> =
  ({ schema, httpPart }) =>
  (data) => {
    const r = safeParse(schema, data);
    if (r.success) return { value: r.data };
    const prefix = httpPart === 'body' || httpPart === undefined ? [] : [httpPart === 'querystring' ? 'query' : httpPart];
    const problems = problemsFromZod(r.error.issues, data, prefix);
    return { error: schema === (ScenarioSchema as unknown) ? new ScenarioError(problems) : new InputError('INVALID_REQUEST', problems) };
  };

export default fp(
  async (app) => {
    app.setValidatorCompiler(validatorCompiler);
    app.setSerializerCompiler(serializerCompiler);
    await app.register(swagger, {
      openapi: {
        openapi: '3.0.3',
        info: {
          title: `${TOOL.name} API`,
          version: TOOL.version,
          description:
            'JSON API for scripts: store scenarios, run evaluations (in the background, with progress and cancel), ' +
            'and fetch results. Bad input answers 400 with one problem per field: path, value found and allowed range. ' +
            'Results support decisions; they do not replace field survey or the decision of the local plant-protection regulator.',
        },
        tags: [
          { name: 'scenarios', description: 'Saved and demo scenarios' },
          { name: 'evaluations', description: 'Background evaluation jobs' },
          { name: 'results', description: 'Stored result documents' },
          { name: 'reference', description: 'Field specifications and limits' },
        ],
      },
      hideUntagged: true,
      transform: jsonSchemaTransform,
    });
  },
  { name: 'openapi' },
);
