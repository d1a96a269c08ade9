/**
 * Wire schema of the detectability map (shared/cycle/detectability.ts): per instrument of each
 * unit, its redundancy and minimal detectable bias at the unit's latest analysed round, and for
 * those no balance checks (or checks weakly) the one measurement that would check it best.
 * SI values (Pa, K, kg/s, W) as everywhere between modules; the app converts.
 *
 *   GET /api/sites/:siteId/detectability?unitId=   engineers, admins → DetectabilityResponse
 */
import { z } from 'zod';
import { QUANTITIES } from '../units';

export const DetectabilityQuery = z.object({ unitId: z.uuid({ error: 'Must be a unit UUID' }).optional() });

const where = { pointId: z.string().optional(), equipmentId: z.string().optional() };

export const Remedy = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('twin'),
    of: z.string(),
    quantity: z.enum(QUANTITIES),
    ...where,
    sigma: z.number(),
    mdb: z.number(),
    redundancy: z.number(),
  }),
  z.object({
    kind: z.literal('new-reading'),
    quantity: z.enum(['pressure', 'temperature', 'massFlow']),
    pointId: z.string(),
    pointLabel: z.string(),
    device: z.string(),
    sigma: z.number(),
    mdb: z.number(),
    redundancy: z.number(),
  }),
  z.object({
    kind: z.literal('tighter'),
    tag: z.string(),
    quantity: z.enum(QUANTITIES),
    sigmaFrom: z.number(),
    sigmaTo: z.number(),
    mdb: z.number(),
    redundancy: z.number(),
  }),
]);
export type Remedy = z.infer<typeof Remedy>;

export const InstrumentDetectability = z.object({
  tag: z.string(),
  quantity: z.enum(QUANTITIES),
  ...where,
  status: z.enum(['checked', 'weak', 'unchecked', 'not-read']),
  sigma: z.number().nullable(),
  redundancy: z.number().nullable(),
  /** minimal detectable bias, SI difference */
  mdb: z.number().nullable(),
  remedy: Remedy.nullable(),
});
export type InstrumentDetectability = z.infer<typeof InstrumentDetectability>;

export const UnitDetectability = z.object({
  unitId: z.uuid(),
  unitName: z.string(),
  /** the analysis whose readings and σ are the operating point */
  analysisId: z.uuid(),
  roundId: z.uuid(),
  analysedAt: z.iso.datetime(),
  alpha: z.number(),
  beta: z.number(),
  delta0: z.number(),
  instruments: z.array(InstrumentDetectability),
});
export type UnitDetectability = z.infer<typeof UnitDetectability>;

export const DetectabilityResponse = z.object({ units: z.array(UnitDetectability) });
export type DetectabilityResponse = z.infer<typeof DetectabilityResponse>;
