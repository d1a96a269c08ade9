/**
 * Builds the inputs of the on-the-spot checks for one instrument from the cycle model and what
 * the round holds so far: the reading's uncertainty (from the instrument's accuracy spec), its
 * scale in SI absolute, its twin's reading, and the partner reading of a saturated point.
 */
import type { CycleModel, Instrument } from '../cycle/model';
import { sigmaFor } from '../uncertainty';
import type { Unit } from '../units';
import { checkReading, type SpotContext, type SpotFlag, type SpotReading } from './spot-checks';

const SATURATED = new Set(['saturated-liquid', 'saturated-vapour']);

/** An instrument's scale (kept in its own reference) as SI absolute bounds. */
export function rangeAbsolute(
  i: Instrument,
  barometricPa: number | undefined,
): { min: number; max: number } | undefined {
  if (i.quantity !== 'pressure' || !i.pressureReference || i.pressureReference === 'absolute') return i.range;
  if (barometricPa === undefined) return undefined;
  if (i.pressureReference === 'gauge') return { min: i.range.min + barometricPa, max: i.range.max + barometricPa };
  return { min: barometricPa - i.range.max, max: barometricPa - i.range.min };
}

function spotReading(
  i: Instrument,
  valueSI: number,
  barometricPa: number | undefined,
  band?: { min: number; max: number },
): SpotReading {
  return {
    tag: i.tag,
    quantity: i.quantity,
    valueSI,
    sigma: sigmaFor(i.accuracy, valueSI),
    display: { unit: i.unit as Unit, reference: i.pressureReference, digits: i.quantity === 'temperature' ? 1 : 2 },
    range: rangeAbsolute(i, barometricPa),
    band,
  };
}

export interface SpotInputs {
  /** The round's latest value of every instrument read so far, SI absolute, by tag. */
  roundValues: Record<string, number>;
  barometricPa?: number;
  /** The route's expected band for this reading, SI absolute. */
  band?: { min: number; max: number };
  previous?: { valueSI: number; hoursAgo: number };
}

/** The instrument measuring `quantity` at a point (or at the point whose pressure it shares). */
function partnerFor(model: CycleModel, i: Instrument, values: Record<string, number>): Instrument | undefined {
  if (!i.point) return undefined;
  const point = model.points.find((p) => p.id === i.point);
  const want = i.quantity === 'pressure' ? 'temperature' : i.quantity === 'temperature' ? 'pressure' : null;
  if (!want) return undefined;
  const candidates = model.instruments.filter((o) => o.quantity === want && values[o.tag] !== undefined);
  if (want === 'pressure') {
    const at = point?.samePressureAs ?? i.point;
    return candidates.find((o) => o.point === i.point) ?? candidates.find((o) => o.point === at);
  }
  // A pressure instrument: a temperature at its point, or at a point that shares its pressure.
  return (
    candidates.find((o) => o.point === i.point) ??
    candidates.find(
      (o) =>
        model.points.find((p) => p.id === o.point)?.samePressureAs === i.point &&
        SATURATED.has(model.points.find((p) => p.id === o.point)!.phase),
    )
  );
}

/** The on-the-spot flags of one reading of `tag`, worded in the gauge's units. */
export function checkInstrumentReading(
  model: CycleModel,
  tag: string,
  valueSI: number,
  inputs: SpotInputs,
): SpotFlag[] {
  const i = model.instruments.find((x) => x.tag === tag);
  if (!i) throw new RangeError(`instrument ${tag} is not in the model ${model.id}`);
  const reading = spotReading(i, valueSI, inputs.barometricPa, inputs.band);
  const ctx: SpotContext = { barometricPa: inputs.barometricPa, previous: inputs.previous };
  if (i.twin && inputs.roundValues[i.twin] !== undefined) {
    const t = model.instruments.find((x) => x.tag === i.twin);
    if (t) ctx.twin = spotReading(t, inputs.roundValues[i.twin], inputs.barometricPa);
  }
  const partner = partnerFor(model, i, inputs.roundValues);
  if (partner) {
    const tPoint = model.points.find((p) => p.id === (i.quantity === 'temperature' ? i.point : partner.point));
    if (tPoint && SATURATED.has(tPoint.phase)) {
      ctx.saturation = {
        pointLabel: tPoint.label,
        partner: spotReading(partner, inputs.roundValues[partner.tag], inputs.barometricPa),
      };
    }
  }
  return checkReading(reading, ctx);
}
