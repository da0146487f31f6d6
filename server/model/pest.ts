import { z } from 'zod';
import { textField } from './text.ts';
import { FIELDS } from './fields.ts';
import { quantitySchema, valueSchema } from './quantity.ts';

/** Growth forms. All per-capita terms use the remaining host fraction h (see growth.ts for the equations). */
export const GROWTH_FORMS = ['logistic', 'allee-cubic', 'mate-finding'] as const;
export const MATING_FUNCTIONS = ['none', 'saturating', 'exponential'] as const;

export const LogisticGrowthSchema = z.strictObject({
  form: z.literal('logistic'),
  /** r [1/yr] */
  rate: quantitySchema(FIELDS.growthRate),
});

export const AlleeCubicGrowthSchema = z.strictObject({
  form: z.literal('allee-cubic'),
  /** r [1/yr] */
  rate: quantitySchema(FIELDS.growthRate),
  /** a [fraction of capacity] */
  alleeThreshold: quantitySchema(FIELDS.alleeThreshold),
});

export const MateFindingGrowthSchema = z
  .strictObject({
    form: z.literal('mate-finding'),
    /** b [1/yr] */
    birthRate: quantitySchema(FIELDS.birthRate),
    /** m [1/yr] */
    deathRate: quantitySchema(FIELDS.deathRate),
    /** gamma [1/yr per unit density] */
    crowding: quantitySchema(FIELDS.crowding).default(0),
    mating: z.enum(MATING_FUNCTIONS, { error: `must be one of ${MATING_FUNCTIONS.join(', ')}` }),
    /** theta [fraction of capacity]; required unless mating is 'none' */
    mateScale: quantitySchema(FIELDS.mateScale).optional(),
  })
  .superRefine((g, ctx) => {
    if (g.mating !== 'none' && g.mateScale === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['mateScale'],
        input: undefined,
        message: `is required when mating is '${g.mating}' (${FIELDS.mateScale.help})`,
      });
    }
  });

export const GrowthSchema = z.discriminatedUnion('form', [
  LogisticGrowthSchema,
  AlleeCubicGrowthSchema,
  MateFindingGrowthSchema,
]);

/** The pest profile: how the insect moves, breeds, dies and kills hosts. */
export const PestSchema = z.strictObject({
  name: textField(120, { required: true }),
  /** True when the numbers are made up for a demonstration; printed on every output. */
  illustrative: z.boolean().default(false),
  notes: textField(4000, { multiline: true }).optional(),
  diffusionHost: quantitySchema(FIELDS.diffusionHost),
  diffusionOpen: quantitySchema(FIELDS.diffusionOpen),
  diffusionNonHost: quantitySchema(FIELDS.diffusionNonHost).optional(),
  edgePreferenceOpen: quantitySchema(FIELDS.edgePreferenceOpen),
  edgePreferenceNonHost: quantitySchema(FIELDS.edgePreferenceNonHost).optional(),
  growth: GrowthSchema,
  hostKillRate: quantitySchema(FIELDS.hostKillRate),
  mortalityOpen: quantitySchema(FIELDS.mortalityOpen),
  mortalityNonHost: quantitySchema(FIELDS.mortalityNonHost).optional(),
});

export type Growth = z.infer<typeof GrowthSchema>;
export type Pest = z.infer<typeof PestSchema>;

/** Fields of the pest profile needed only when non-host forest appears in a layout or option. */
export const NON_HOST_PEST_FIELDS = ['diffusionNonHost', 'edgePreferenceNonHost', 'mortalityNonHost'] as const;

export { valueSchema };
