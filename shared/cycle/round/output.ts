/**
 * The per-instrument results and the reconciliation's summary as the analysis reports them, once
 * the states are known.
 */
import type { InstrumentResult, ReconciliationOutput, VariableResult } from '../types';
import { SCALE, SI_UNIT_OF } from '../equations';
import { fin, signedFinal, correlatedPairs } from './base';
import type { StatesCtx } from './states';

/** Per-instrument results and the reconciliation as the analysis reports them. */
export function outputStage(c: StatesCtx) {
  const { model, accepted, excluded, readingSigma, eq, res, recError, scaleOf, suspects, recV, recS } = c;
  const redundant = new Set(res?.redundant ?? []);
  const instruments: InstrumentResult[] = model.instruments.map((i) => {
    const a = accepted.get(i.tag);
    const inRec = !!res && i.tag in res.values;
    const sc = fin(SCALE[eq.vars[i.tag]?.kind ?? 'T']) ? scaleOf(i.tag) : 1;
    const status: InstrumentResult['status'] = !a
      ? excluded.has(i.tag)
        ? 'excluded'
        : 'missing'
      : eq.notInBalance.includes(i.tag)
        ? 'not-in-balance'
        : 'used';
    return {
      tag: i.tag,
      ...(i.id ? { id: i.id } : {}),
      quantity: i.quantity,
      ...(i.point ? { pointId: i.point } : {}),
      ...(i.equipment ? { equipmentId: i.equipment } : {}),
      status,
      reading: a?.value ?? null,
      sigma: a?.sigma ?? readingSigma.get(i.tag) ?? null,
      reconciled: inRec ? res!.values[i.tag] * sc : status === 'not-in-balance' ? a!.value : null,
      reconciledSigma: inRec ? res!.sigmas[i.tag] * sc : status === 'not-in-balance' ? a!.sigma : null,
      correction: inRec ? res!.corrections[i.tag] * sc : status === 'not-in-balance' ? 0 : null,
      z: inRec ? (res!.z[i.tag] ?? null) : null,
      redundant: redundant.has(i.tag),
      suspect: suspects.has(i.tag),
      estimate: a ? recV(i.tag) : null,
      estimateSigma: a ? recS(i.tag) : null,
      u: !res ? null : suspects.has(i.tag) ? (res.eliminatedU[i.tag] ?? null) : signedFinal(res, i.tag),
    };
  });

  let reconciliation: ReconciliationOutput;
  if (!res) reconciliation = { ok: false, error: recError ?? { code: 'ERROR', message: 'no reconciliation' } };
  else {
    const observable = new Set(res.observable);
    const variables: VariableResult[] = Object.values(eq.vars)
      .filter((vi) => !vi.measured || vi.id in res!.values || suspects.has(vi.id))
      .filter((vi) => (vi.measured ? eq.measured.some((m) => m.id === vi.id) : true))
      .map((vi) => {
        const sc = SCALE[vi.kind];
        const has = vi.id in res!.values;
        return {
          id: vi.id,
          kind: vi.kind,
          unit: SI_UNIT_OF[vi.kind],
          ...(vi.pointId ? { pointId: vi.pointId } : {}),
          ...(vi.equipmentId ? { equipmentId: vi.equipmentId } : {}),
          ...(vi.instrumentTag ? { instrumentTag: vi.instrumentTag } : {}),
          measured: vi.measured,
          value: has ? res!.values[vi.id] * sc : null,
          sigma: has ? res!.sigmas[vi.id] * sc : null,
          correction: vi.measured && has ? res!.corrections[vi.id] * sc : null,
          z: vi.measured ? (res!.z[vi.id] ?? null) : null,
          finalValue: vi.id in res!.final.values ? res!.final.values[vi.id] * sc : null,
          finalSigma: vi.id in res!.final.sigmas ? res!.final.sigmas[vi.id] * sc : null,
          redundant: redundant.has(vi.id),
          observable: vi.measured || observable.has(vi.id),
        };
      });
    reconciliation = {
      ok: true,
      chiSquare: res.chiSquare,
      dof: res.dof,
      critical: res.critical,
      passed: res.passed,
      zCritical: res.zCritical,
      iterations: res.iterations,
      suspects: [...res.suspects],
      final: {
        chiSquare: res.final.chiSquare,
        dof: res.final.dof,
        critical: res.final.critical,
        passed: res.final.passed,
      },
      ...(res.eliminationError ? { eliminationError: { ...res.eliminationError } } : {}),
      constraintTests: { ...res.constraintTests },
      correlatedCorrections: correlatedPairs(res),
      variables,
      constraints: eq.constraints.map((c) => {
        const ci = eq.info[c.id];
        return {
          id: c.id,
          kind: ci.kind,
          ...(ci.equipmentId ? { equipmentId: ci.equipmentId } : {}),
          ...(ci.pointId ? { pointId: ci.pointId } : {}),
          label: ci.label,
        };
      }),
    };
  }

  return { instruments, reconciliation };
}
