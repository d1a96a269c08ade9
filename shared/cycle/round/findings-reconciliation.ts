/**
 * Findings from the reconciliation's tests: each suspect (a measurement that failed the individual
 * test and was eliminated, VDI 2048) with the group the balances cannot tell it from, what the rest of
 * the plant says it should read, and a gauge read as absolute (or the reverse).
 *
 * Twins and saturated points are constraints of the reconciliation: a disagreement between two
 * twins or between p and T at saturation is tested there once, by the global and the individual
 * tests above, and a suspect's message names the twin or the saturation that holds it
 * (contextFor). The phone's prompts at the gauge (shared/checks) stay liberal: they ask for a
 * re-read, they are not findings.
 */
import { type Unit } from '../../units';
import { showDelta, showKPa, showValue, showWithSpread } from '../format';
import { type Instrument } from '../model';
import { messages, whoOf } from '../messages';
import type { Evidence } from '../types';
import { ATTEND, severityForCriticality } from '../severity';
import { shownOf, lcFirst, joinNames } from './base';
import type { FindingsCtx } from './context';

/** Gross errors (with their group and what the rest of the plant says) and pressure references mixed up. */
export function grossErrorFindings(c: FindingsCtx) {
  const { model, b, k, instByTag, eqById, pointById, add, placeOf, critOf, accepted, eq, res, scaleOf, suspects } = c;
  const constraintsOf = new Map<string, string[]>();
  for (const ci of Object.values(eq.info))
    for (const d of ci.deps) constraintsOf.set(d, [...(constraintsOf.get(d) ?? []), ci.id]);
  /** what an instrument is held against, in words: "its twin TI-102B and the generator balance" */
  const contextFor = (i: Instrument): { phrase: string; plural: boolean } => {
    const equipmentNames: string[] = [];
    const saturation: string[] = [];
    const partners: string[] = [];
    const pushU = (list: string[], x: string) => {
      if (!list.includes(x)) list.push(x);
    };
    const visit = (cid: string, depth: number) => {
      const ci = eq.info[cid];
      if (ci.kind === 'twin' && depth > 0) return;
      if (ci.kind === 'saturation') pushU(saturation, pointById.get(ci.pointId!)!.label);
      else if (ci.kind === 'twin' || ci.kind === 'stream') {
        const other = ci.deps.find((d) => d !== i.tag);
        if (other && !suspects.has(other)) {
          pushU(partners, other);
          // what holds the partner holds this one too
          if (depth === 0) for (const c of constraintsOf.get(other) ?? []) if (c !== cid) visit(c, 1);
        }
      } else if (ci.equipmentId) pushU(equipmentNames, eqById.get(ci.equipmentId)!.label);
    };
    for (const c of constraintsOf.get(i.tag) ?? []) visit(c, 0);
    const parts: string[] = [];
    const twin = partners.filter((t) => t === i.twin);
    const rest = partners.filter((t) => t !== i.twin);
    if (twin.length) parts.push(`its twin ${twin[0]}`);
    if (rest.length) parts.push(`${joinNames(rest)} on the same ${i.quantity === 'massFlow' ? 'stream' : 'point'}`);
    // a splitter or valve only passes the enthalpy on: name it when nothing else holds the reading
    const throughOnly = new Set(
      model.equipment.filter((e) => e.kind === 'splitter' || e.kind === 'throttle').map((e) => e.label),
    );
    const real = equipmentNames.filter((n) => !throughOnly.has(n));
    const names = (real.length ? real : equipmentNames).map(lcFirst);
    if (names.length === 1) parts.push(`the ${names[0]} balance`);
    else if (names.length > 1)
      parts.push(`the ${names.length > 2 ? `${names.slice(0, 2).join(', ')} and other` : joinNames(names)} balances`);
    if (saturation.length) parts.push(`saturation at ${joinNames(saturation.map(lcFirst))}`);
    if (parts.length === 0) return { phrase: 'the rest of the readings', plural: true };
    return { phrase: joinNames(parts), plural: parts.length > 1 || names.length > 1 };
  };

  // gross errors
  if (res) {
    const zc = res.zCritical;
    for (const tag of res.suspects) {
      const inst = instByTag.get(tag)!;
      const reading = accepted.get(tag)!;
      const sc = scaleOf(tag);
      const z = res.z[tag] ?? null;
      const est = tag in res.final.values ? res.final.values[tag] * sc : null;
      const estS = tag in res.final.sigmas ? res.final.sigmas[tag] * sc : null;
      const group = res.suspectGroups[res.suspects.indexOf(tag)] ?? [tag];
      const alike = group.filter((t) => t !== tag && !suspects.has(t));
      const shown = shownOf(inst);
      const ctx = contextFor(inst);
      const who = whoOf([tag, ...alike]);
      let message: string;
      const evidence: Evidence = {
        reading: reading.value,
        sigma: reading.sigma,
        z,
        zCritical: zc,
        correction: (res.corrections[tag] ?? 0) * sc,
        estimate: est,
        estimateSigma: estS,
        coverage: k,
        chiSquare: res.chiSquare,
        chiSquareCritical: res.critical,
        dof: res.dof,
        alsoSuspect: alike,
      };
      if (est !== null && estS !== null) {
        const d = reading.value - est;
        const dOwn = inst.quantity === 'pressure' && inst.pressureReference === 'vacuum' ? -d : d;
        message = messages.grossError(
          who,
          showDelta(shown, Math.abs(d), k * estS),
          dOwn > 0,
          ctx.phrase,
          ctx.plural,
          showWithSpread(shown, est, k * estS, b),
        );
        evidence.difference = d;
      } else {
        message = messages.grossErrorNoEstimate(who, ctx.phrase, z === null ? '—' : z.toFixed(1), zc.toFixed(2));
      }
      add('gross-error', severityForCriticality(critOf(inst)), [tag, ...alike], message, evidence, placeOf(inst));
      // read as absolute / as gauge
      if (inst.quantity === 'pressure' && est !== null && estS !== null) {
        const U = k * Math.sqrt(estS * estS + reading.sigma * reading.sigma);
        const d = est - reading.value;
        const unit = inst.unit as Unit;
        if (inst.pressureReference === 'gauge' && Math.abs(d - b) <= U) {
          add(
            'gauge-read-as-absolute',
            ATTEND,
            [tag],
            messages.readAsAbsolute(
              tag,
              showKPa(d),
              ctx.phrase,
              ctx.plural,
              showValue(shown, est, b, k * estS),
              showKPa(b),
              unit,
            ),
            { reading: reading.value, estimate: est, difference: d, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        } else if (inst.pressureReference === 'absolute' && Math.abs(-d - b) <= U) {
          add(
            'absolute-read-as-gauge',
            ATTEND,
            [tag],
            messages.readAsGauge(
              tag,
              showKPa(-d),
              ctx.phrase,
              ctx.plural,
              showValue(shown, est, b, k * estS),
              showKPa(b),
              unit,
            ),
            { reading: reading.value, estimate: est, difference: d, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        } else if (inst.pressureReference === 'vacuum' && Math.abs(reading.value - (b - est)) <= U) {
          add(
            'gauge-read-as-absolute',
            ATTEND,
            [tag],
            messages.vacuumAsAbsolute(
              tag,
              showKPa(reading.value),
              showValue(shown, est, b, k * estS),
              showKPa(est),
              unit,
            ),
            { reading: reading.value, estimate: est, barometricPa: b, allowed: U, coverage: k },
            placeOf(inst),
          );
        }
      }
    }
  }
}
