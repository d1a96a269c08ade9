/**
 * Route templates as data: a route is the walk a technician makes on one unit, stop by stop in
 * walking order; at each stop the readings to take (which instrument, in which unit, what band
 * to expect) and the checks to answer. Pure zod: the app, the server and the seed parse the same
 * shape. Semantic checks (duplicate ids, tags the model does not know, units of the wrong
 * quantity, bands) are in ./validate.ts.
 */
import { z } from 'zod';
import { TAG_RE } from '../cycle/model';
import { PRESSURE_REFERENCES } from '../units';

/** Ids inside a template (route, stop, check): lower-case slug, e.g. "boiler-house", "drum-level-glass". */
export const SLUG_PATTERN = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;
/** Instrument tags as the cycle model writes them: ISA-5.1 letters, a loop number, a suffix ("PI-101", "TI-203A"). */
export const TAG_PATTERN = TAG_RE;

export const TEMPLATE_LIMITS = {
  stops: 100,
  readingsPerStop: 60,
  checksPerStop: 40,
  options: 12,
  idLength: 64,
  nameLength: 120,
  textLength: 500,
} as const;

const text = (max: number) =>
  z
    .string({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a string') })
    .trim()
    .min(1, 'Must not be empty')
    .max(max, `Must be at most ${max} characters`);

export const TemplateId = z
  .string({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a string') })
  .max(TEMPLATE_LIMITS.idLength, `Must be at most ${TEMPLATE_LIMITS.idLength} characters`)
  .regex(SLUG_PATTERN, 'Must be a lower-case slug like "boiler-house" (a–z, 0–9, single hyphens)');

export const InstrumentTag = z
  .string({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a string') })
  .regex(TAG_PATTERN, 'Must be an ISA-5.1 style tag like "PI-101" or "TI-203A"');

const finite = z.number({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a finite number') });

/** The band a healthy reading falls in, in the gauge's own unit (and reference). */
export const ExpectedBand = z.object({ min: finite, max: finite });
export type ExpectedBand = z.infer<typeof ExpectedBand>;

/** One reading to take at a stop. */
export const RouteReading = z.object({
  tag: InstrumentTag,
  /** The unit the gauge face shows, as shared/units spells it ("bar", "°C", "t/h", "%"). */
  unit: text(16),
  /** Pressure only: what the gauge reads against. */
  reference: z.enum(PRESSURE_REFERENCES, { error: 'Must be one of absolute, gauge, vacuum' }).optional(),
  band: ExpectedBand,
  required: z.boolean({ error: 'Must be true or false' }),
});
export type RouteReading = z.infer<typeof RouteReading>;

const checkBase = {
  id: TemplateId,
  prompt: text(TEMPLATE_LIMITS.textLength),
  photoRequired: z.boolean({ error: 'Must be true or false' }),
};

export const CHECK_KINDS = ['yes-no', 'choice', 'text'] as const;
export type CheckKind = (typeof CHECK_KINDS)[number];

export const RouteCheck = z.discriminatedUnion(
  'kind',
  [
    z.object({
      ...checkBase,
      kind: z.literal('yes-no'),
      /** The healthy answer; another answer is worth a note (a leak: expected false). */
      expected: z.boolean({ error: 'Must be true or false' }).optional(),
    }),
    z.object({
      ...checkBase,
      kind: z.literal('choice'),
      options: z
        .array(text(TEMPLATE_LIMITS.nameLength))
        .min(2, 'A choice needs at least 2 options')
        .max(TEMPLATE_LIMITS.options, `A choice takes at most ${TEMPLATE_LIMITS.options} options`),
    }),
    z.object({ ...checkBase, kind: z.literal('text') }),
  ],
  { error: (iss) => (iss.code === 'invalid_union' ? `kind must be one of ${CHECK_KINDS.join(', ')}` : undefined) },
);
export type RouteCheck = z.infer<typeof RouteCheck>;

export const RouteStop = z.object({
  id: TemplateId,
  name: text(TEMPLATE_LIMITS.nameLength),
  /** Where the stop is (building, floor, bay), so a new technician finds it. */
  area: text(TEMPLATE_LIMITS.nameLength),
  /** A hazard to show before the stop's readings (hot surfaces, rotating plant…). */
  caution: text(TEMPLATE_LIMITS.textLength).optional(),
  readings: z
    .array(RouteReading)
    .max(TEMPLATE_LIMITS.readingsPerStop, `A stop takes at most ${TEMPLATE_LIMITS.readingsPerStop} readings`),
  checks: z
    .array(RouteCheck)
    .max(TEMPLATE_LIMITS.checksPerStop, `A stop takes at most ${TEMPLATE_LIMITS.checksPerStop} checks`),
});
export type RouteStop = z.infer<typeof RouteStop>;

export const RouteTemplate = z.object({
  id: TemplateId,
  name: text(TEMPLATE_LIMITS.nameLength),
  /** Id of the unit's cycle model (the model's own id, not a database id). */
  unitId: text(TEMPLATE_LIMITS.idLength),
  /** In walking order. */
  stops: z
    .array(RouteStop)
    .min(1, 'A route needs at least one stop')
    .max(TEMPLATE_LIMITS.stops, `A route takes at most ${TEMPLATE_LIMITS.stops} stops`),
});
export type RouteTemplate = z.infer<typeof RouteTemplate>;
