/**
 * Wire schema of an instrument's configuration change (site admins). Pure zod.
 *
 *   PATCH /api/sites/:siteId/instruments/:instrumentId  InstrumentUpdateRequest → InstrumentUpdateResponse
 *
 * `range` is the scale in SI in the instrument's own reference (Pa gauge for a gauge, K, kg/s, W,
 * 1 for a level), as everywhere between modules. `accuracyClass` changes the class (or grade) of
 * the instrument's accuracy specification, keeping its kind: the server checks it against the
 * classes of that standard (shared/uncertainty). A field left out stays as it is.
 */
import { z } from 'zod';
import { ASME_B40_GRADES, EN837_CLASSES } from '../uncertainty';
import { INSTRUMENT_STATUSES, SyncInstrument } from './sync';

/** The classes (grades) of each accuracy standard that has them (shared/uncertainty), by the spec's kind. */
export const ACCURACY_CLASSES: Readonly<
  Record<string, { field: 'class' | 'grade'; standard: string; values: readonly (string | number)[] }>
> = {
  en837: { field: 'class', standard: 'EN 837-1', values: EN837_CLASSES },
  asmeB40: { field: 'grade', standard: 'ASME B40.100', values: Object.keys(ASME_B40_GRADES) },
  iec60751: { field: 'class', standard: 'IEC 60751', values: ['AA', 'A', 'B', 'C'] },
  iec60584: { field: 'class', standard: 'IEC 60584-1', values: [1, 2, 3] },
};

/** Largest |value| of a range end, SI (1 GPa, 1 GW, 10⁹ K: beyond any plant instrument). */
export const RANGE_ABS_MAX = 1e9;
/** Longest calibration interval, days (ten years). */
export const CALIBRATION_INTERVAL_MAX_DAYS = 3650;

const end = (name: 'min' | 'max') =>
  z
    .number({ error: `Must be a number (the range's ${name}, SI)` })
    .refine(Number.isFinite, 'Must be a finite number')
    .refine((v) => Math.abs(v) <= RANGE_ABS_MAX, `Must be between -${RANGE_ABS_MAX} and ${RANGE_ABS_MAX}`);

export const InstrumentRange = z
  .object({ min: end('min'), max: end('max') })
  .refine((r) => r.max > r.min, { path: ['max'], message: 'Must be greater than min' });

export const InstrumentUpdateRequest = z
  .object({
    range: InstrumentRange.optional(),
    accuracyClass: z
      .union([z.string(), z.number()], { error: 'Must be the class or grade, as text or a number' })
      .transform((v) => String(v).trim())
      .pipe(z.string().min(1, 'Must not be empty').max(8, 'Must be at most 8 characters'))
      .optional(),
    calibrationIntervalDays: z
      .number({ error: `Must be a whole number of days from 1 to ${CALIBRATION_INTERVAL_MAX_DAYS}, or null` })
      .int(`Must be a whole number of days from 1 to ${CALIBRATION_INTERVAL_MAX_DAYS}`)
      .min(1, 'Must be at least 1 day')
      .max(CALIBRATION_INTERVAL_MAX_DAYS, `Must be at most ${CALIBRATION_INTERVAL_MAX_DAYS} days`)
      .nullable()
      .optional(),
    status: z.enum(INSTRUMENT_STATUSES, { error: `Must be one of ${INSTRUMENT_STATUSES.join(', ')}` }).optional(),
    /** the row version the change was made on; a newer row on the server → 409 */
    rowVersion: z.number().int().min(1).optional(),
  })
  .strict()
  .refine(
    (b) =>
      b.range !== undefined ||
      b.accuracyClass !== undefined ||
      b.calibrationIntervalDays !== undefined ||
      b.status !== undefined,
    {
      message: 'Give at least one of range, accuracyClass, calibrationIntervalDays, status',
    },
  );
export type InstrumentUpdateRequest = z.input<typeof InstrumentUpdateRequest>;

export const InstrumentUpdateResponse = z.object({
  instrument: SyncInstrument,
  /** the fields that changed, before → after */
  changes: z.record(z.string(), z.object({ from: z.unknown(), to: z.unknown() })),
});
export type InstrumentUpdateResponse = z.infer<typeof InstrumentUpdateResponse>;
