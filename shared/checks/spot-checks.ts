/**
 * On-the-spot checks of one reading, run on the phone as it is typed (and again on the server):
 * outside the expected band, outside the instrument's range, a saturated point whose pressure and
 * temperature disagree beyond their uncertainty, twin instruments disagreeing, a large change since
 * the last round. Pure and deterministic; every value in SI (Pa absolute, K, kg/s, W).
 *
 * A flag asks for a re-read at the gauge; it does not judge the instrument. The combined-uncertainty
 * tests use a coverage factor k = 2 (about 95 % for a normal distribution, GUM JCGM 100:2008 §6.3).
 */
import { SteamRangeError, tsat } from '../steam';
import { formatValue, fromSIDelta, type PressureRef, type Quantity, type Unit } from '../units';

/** Coverage factor of the disagreement tests (GUM §6.3: k = 2 ≈ 95 %). */
export const COVERAGE_K = 2;

export type SpotFlagKind = 'band' | 'range' | 'saturation' | 'twin' | 'jump' | 'if97';

export interface SpotFlag {
  kind: SpotFlagKind;
  /** 1 = re-read now, 2 = re-read advised, 3 = for information. */
  severity: 1 | 2 | 3;
  message: string;
  /** The figures behind the message, in SI. */
  evidence: Record<string, number | string>;
}

/** How the gauge shows its value: used to word the messages in the technician's units. */
export interface Display {
  unit: Unit;
  reference?: PressureRef;
  digits?: number;
}

export interface SpotReading {
  tag: string;
  quantity: Quantity;
  valueSI: number;
  /** Standard uncertainty of the reading, SI. */
  sigma: number;
  display: Display;
  /** Instrument range (scale), SI. */
  range?: { min: number; max: number };
  /** Expected band for this reading on this route, SI. */
  band?: { min: number; max: number };
}

export interface SpotContext {
  /** Barometric pressure of the round, Pa (needed to word gauge and vacuum pressures). */
  barometricPa?: number;
  /** The twin instrument's reading on this round, if taken. */
  twin?: SpotReading;
  /**
   * The saturated point this reading belongs to, with the partner reading (a temperature for a
   * pressure, a pressure for a temperature), and the point's name for the message.
   */
  saturation?: { pointLabel: string; partner: SpotReading };
  /** The same instrument on the last round. */
  previous?: { valueSI: number; hoursAgo: number };
  /**
   * Largest change since the last round that is not flagged, as a fraction of the instrument's
   * span (default 0.2 — a project choice, not a standard).
   */
  jumpFraction?: number;
}

function show(r: Pick<SpotReading, 'quantity' | 'display'>, si: number, ctx: SpotContext): string {
  try {
    return formatValue(si, r.quantity, r.display.unit, r.display.reference, {
      digits: r.display.digits ?? 2,
      barometricPa: ctx.barometricPa,
    });
  } catch {
    // No barometric pressure to word a gauge or vacuum value: say it as absolute instead.
    if (r.quantity === 'pressure')
      return formatValue(si, 'pressure', r.display.unit, 'absolute', { digits: r.display.digits ?? 2 });
    return `${si.toPrecision(6)} (SI)`;
  }
}

function showDelta(r: Pick<SpotReading, 'quantity' | 'display'>, si: number): string {
  const unit = r.quantity === 'temperature' ? (r.display.unit === '°F' ? '°F' : 'K') : r.display.unit;
  const v = fromSIDelta(r.quantity, si, unit);
  return `${v.toFixed(r.display.digits ?? 2)} ${unit}`;
}

/** Every flag for one reading, most severe first (stable order for equal severity). */
export function checkReading(r: SpotReading, ctx: SpotContext = {}): SpotFlag[] {
  if (!Number.isFinite(r.valueSI)) throw new RangeError(`${r.tag}: value is not a finite number`);
  if (!(r.sigma > 0) || !Number.isFinite(r.sigma))
    throw new RangeError(`${r.tag}: sigma must be a positive finite number, got ${r.sigma}`);
  const flags: SpotFlag[] = [];
  const v = r.valueSI;

  if (r.range && (v < r.range.min || v > r.range.max)) {
    flags.push({
      kind: 'range',
      severity: 1,
      message: `${r.tag} reads ${show(r, v, ctx)}, outside the instrument's scale of ${show(r, r.range.min, ctx)} to ${show(r, r.range.max, ctx)}. Re-read the gauge; a value off the scale cannot be read from it.`,
      evidence: { value: v, rangeMin: r.range.min, rangeMax: r.range.max },
    });
  }

  if (r.band && (v < r.band.min || v > r.band.max)) {
    flags.push({
      kind: 'band',
      severity: 2,
      message: `${r.tag} reads ${show(r, v, ctx)}; this round expects ${show(r, r.band.min, ctx)} to ${show(r, r.band.max, ctx)}. Re-read the gauge.`,
      evidence: { value: v, bandMin: r.band.min, bandMax: r.band.max },
    });
  }

  if (ctx.twin && ctx.twin.quantity === r.quantity) {
    const d = v - ctx.twin.valueSI;
    const allowed = COVERAGE_K * Math.hypot(r.sigma, ctx.twin.sigma);
    if (Math.abs(d) > allowed) {
      flags.push({
        kind: 'twin',
        severity: 2,
        message: `${r.tag} reads ${show(r, v, ctx)} and its twin ${ctx.twin.tag} ${show(ctx.twin, ctx.twin.valueSI, ctx)}: they differ by ${showDelta(r, Math.abs(d))}, more than their combined uncertainty allows (±${showDelta(r, allowed)}). Re-read both.`,
        evidence: { value: v, twin: ctx.twin.valueSI, difference: d, allowed },
      });
    }
  }

  if (ctx.saturation) {
    const f = saturationFlag(r, ctx.saturation.partner, ctx.saturation.pointLabel, ctx);
    if (f) flags.push(f);
  }

  if (ctx.previous && r.range) {
    const span = r.range.max - r.range.min;
    const limit = (ctx.jumpFraction ?? 0.2) * span;
    const d = v - ctx.previous.valueSI;
    if (Math.abs(d) > limit) {
      flags.push({
        kind: 'jump',
        severity: 3,
        message: `${r.tag} reads ${show(r, v, ctx)}; on the last round (${ctx.previous.hoursAgo.toFixed(0)} h ago) it read ${show(r, ctx.previous.valueSI, ctx)}. A change of ${showDelta(r, Math.abs(d))} is large for this gauge: re-read it, and note why if it is real.`,
        evidence: { value: v, previous: ctx.previous.valueSI, change: d, limit },
      });
    }
  }

  return flags.sort((a, b) => a.severity - b.severity);
}

/**
 * A point declared saturated (drum, deaerator, hotwell): its temperature must equal Tsat(p).
 * The disagreement is tested against σ² = σ_T² + (dTsat/dp · σ_p)², with dTsat/dp by a central
 * difference on the IF97 saturation line.
 */
export function saturationFlag(
  r: SpotReading,
  partner: SpotReading,
  pointLabel: string,
  ctx: SpotContext = {},
): SpotFlag | null {
  const pR = r.quantity === 'pressure' ? r : partner.quantity === 'pressure' ? partner : null;
  const tR = r.quantity === 'temperature' ? r : partner.quantity === 'temperature' ? partner : null;
  if (!pR || !tR || pR === tR) return null;
  let ts: number;
  let slope: number;
  try {
    ts = tsat(pR.valueSI);
    const dp = Math.max(pR.valueSI * 1e-4, 1);
    slope = (tsat(pR.valueSI + dp) - tsat(pR.valueSI - dp)) / (2 * dp);
  } catch (e) {
    if (e instanceof SteamRangeError) {
      return {
        kind: 'if97',
        severity: 1,
        message: `${pR.tag} reads ${show(pR, pR.valueSI, ctx)}, where water cannot boil (${e.message}). Re-read the gauge and check its reference (gauge, absolute or vacuum).`,
        evidence: { pressure: pR.valueSI },
      };
    }
    throw e;
  }
  const d = tR.valueSI - ts;
  const sigma = Math.hypot(tR.sigma, slope * pR.sigma);
  const allowed = COVERAGE_K * sigma;
  if (Math.abs(d) <= allowed) return null;
  const word = d > 0 ? 'above' : 'below';
  return {
    kind: 'saturation',
    severity: 2,
    message: `${pointLabel}: ${tR.tag} reads ${show(tR, tR.valueSI, ctx)}, ${showDelta(tR, Math.abs(d))} ${word} the boiling point at ${pR.tag}'s ${show(pR, pR.valueSI, ctx)} (${show(tR, ts, ctx)}; allowed ±${showDelta(tR, allowed)}). Re-read ${r.tag}${r === tR ? '' : ' and ' + tR.tag}.`,
    evidence: { temperature: tR.valueSI, pressure: pR.valueSI, tsat: ts, difference: d, allowed },
  };
}
