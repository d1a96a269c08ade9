/**
 * Stage 1, intake: each reading matched to its instrument (by tag or id), its σ from the reading or
 * the instrument's accuracy spec at its reference value (+ the barometric σ for gauge and vacuum
 * readings); readings outside the range are noted, readings outside IF97 set aside.
 */
import { P_MAX, T_MAX_5 } from '../../steam';
import { showValue } from '../format';
import { type Instrument } from '../model';
import { P_LOW } from '../properties';
import { messages } from '../messages';
import type { RoundReading } from '../types';
import { ATTEND, NOTE } from '../severity';
import { fin, shownOf, ownReference, rangeText, specSigmaOf, type BaseCtx, type Intake } from './base';

/** Intake: each reading matched to its instrument, its σ, range and IF97 checks; missing readings noted. */
export function intakeStage(c: BaseCtx, readings: readonly RoundReading[]) {
  const { model, opt, b, instByTag, instById, add, placeOf, placeLabel } = c;
  const resolve = (r: RoundReading): Instrument | undefined =>
    (typeof r?.instrumentTag === 'string' ? instByTag.get(r.instrumentTag) : undefined) ??
    (typeof r?.instrumentId === 'string' ? instById.get(r.instrumentId) : undefined);

  const valid = new Map<string, RoundReading[]>();
  const invalid = new Set<string>();
  for (const r of readings) {
    const inst = resolve(r);
    if (!inst) {
      const name = String(r?.instrumentTag ?? r?.instrumentId ?? '(none)');
      add('unknown-instrument', NOTE, [], messages.unknownInstrument(name), {
        instrument: name,
        value: fin(r?.valueSI) ? r.valueSI : null,
      });
      continue;
    }
    if (!fin(r.valueSI)) {
      add(
        'invalid-reading',
        ATTEND,
        [inst.tag],
        messages.notANumber(inst.tag, String(r.valueSI)),
        { value: String(r.valueSI) },
        placeOf(inst),
      );
      invalid.add(inst.tag);
      continue;
    }
    valid.set(inst.tag, [...(valid.get(inst.tag) ?? []), r]);
  }

  const specSigma = (i: Instrument): number | null => specSigmaOf(model, i, b);
  const baroSigma = (i: Instrument) =>
    i.quantity === 'pressure' && i.pressureReference !== 'absolute' ? opt.barometricSigmaPa : 0;

  const accepted = new Map<string, Intake>();
  const excluded = new Set<string>();
  const readingSigma = new Map<string, number>();
  for (const inst of model.instruments) {
    const list = valid.get(inst.tag);
    if (!list) continue;
    const r = list[list.length - 1];
    if (list.length > 1) {
      add(
        'duplicate-reading',
        NOTE,
        [inst.tag],
        messages.duplicate(inst.tag, list.length),
        { values: list.map((x) => x.valueSI) },
        placeOf(inst),
      );
    }
    const value = r.valueSI;
    const shown = shownOf(inst);
    // σ
    let sigma: number | null = null;
    if (r.sigma !== undefined) {
      if (fin(r.sigma) && r.sigma > 0) sigma = r.sigma;
      else {
        add(
          'invalid-reading',
          NOTE,
          [inst.tag],
          messages.badSigma(inst.tag, String(r.sigma)),
          { sigma: String(r.sigma) },
          placeOf(inst),
        );
      }
    }
    if (sigma === null) {
      const s = specSigma(inst);
      if (s === null || !(s > 0)) {
        excluded.add(inst.tag);
        add('invalid-reading', ATTEND, [inst.tag], messages.noSigma(inst.tag), { value }, placeOf(inst));
        continue;
      }
      sigma = Math.sqrt(s * s + baroSigma(inst) ** 2);
    }
    readingSigma.set(inst.tag, sigma);
    // range
    const own = ownReference(inst, value, b);
    if (own < inst.range.min || own > inst.range.max) {
      add(
        'out-of-range',
        ATTEND,
        [inst.tag],
        messages.outOfRange(inst.tag, showValue(shown, value, b, sigma), own < inst.range.min, rangeText(inst)),
        { value, ownReference: own, rangeMin: inst.range.min, rangeMax: inst.range.max },
        placeOf(inst),
      );
    }
    // IF97
    if (inst.quantity === 'pressure' || inst.quantity === 'temperature') {
      let why: string | null = null;
      if (inst.quantity === 'pressure' && value < P_LOW)
        why = `below ${P_LOW.toFixed(1)} Pa absolute, the triple-point pressure where the steam tables stop`;
      if (inst.quantity === 'pressure' && value > P_MAX) why = 'above 100 MPa absolute, the top of IAPWS-IF97';
      if (inst.quantity === 'temperature' && value < 273.15) why = 'below 0 °C, the bottom of IAPWS-IF97';
      if (inst.quantity === 'temperature' && value > T_MAX_5) why = 'above 2000 °C, the top of IAPWS-IF97';
      if (why) {
        excluded.add(inst.tag);
        add(
          'outside-if97',
          2,
          [inst.tag],
          messages.outsideIf97(inst.tag, showValue(shown, value, b, sigma), why),
          { value },
          placeOf(inst),
        );
        continue;
      }
    }
    accepted.set(inst.tag, { inst, value, sigma });
  }
  for (const inst of model.instruments) {
    if (accepted.has(inst.tag) || excluded.has(inst.tag) || invalid.has(inst.tag)) continue;
    add(
      'missing-reading',
      NOTE,
      [inst.tag],
      messages.missing(inst.tag, inst.label ?? placeLabel(inst)),
      {},
      placeOf(inst),
    );
  }

  return { resolve, accepted, excluded, invalid, readingSigma, baroSigma };
}

/** What the intake stage adds. */
export type IntakeOut = ReturnType<typeof intakeStage>;
