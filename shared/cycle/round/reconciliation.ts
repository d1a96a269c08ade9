/**
 * Stage 2, reconciliation: the plant equations (../equations.ts) reconciled by reconcile() (VDI 2048
 * weighted least squares, global χ² test, individual tests, elimination of what fails them), and the
 * per-instrument and reconciliation output of the analysis.
 */
import { reconcile, type Correlation, type ReconcileInput, type ReconcileResult } from '../../reconcile';
import { buildEquations, SCALE, SI_UNIT_OF, type AcceptedReading, type EquationSystem } from '../equations';
import { messages } from '../messages';
import type { InstrumentResult, ReconciliationOutput, VariableResult } from '../types';
import { ATTEND, NOTE } from '../severity';
import { fin, signedFinal, correlatedPairs } from './base';
import type { BaseCtx, IntakeOut, StatesCtx } from './context';

/** The plant equations reconciled (VDI 2048), the barometric pressure a common input of gauge and vacuum readings. */
export function reconciliationStage(c: BaseCtx & IntakeOut) {
  const { model, opt, add, accepted, baroSigma } = c;
  const acc = new Map<string, AcceptedReading>([...accepted].map(([t, r]) => [t, { tag: t, value: r.value, sigma: r.sigma }]));
  const eq: EquationSystem = buildEquations(model, acc);
  let res: ReconcileResult | null = null;
  let recError: { code: string; message: string } | null = null;
  /** the input reconcile() was called with (the figures' uncertainty is propagated through it) */
  let recInput: ReconcileInput | null = null;
  if (eq.measured.length === 0 || eq.constraints.length === 0) {
    recError = { code: 'NO_DATA', message: 'no reading of this round enters a balance: nothing to reconcile' };
  } else {
    try {
      // the barometric pressure is one common input of every gauge and vacuum reading: their errors
      // share its variance σ_b² (gauge: p = p_g + b; vacuum: p = b − p_v; both ∂p/∂b = 1; GUM §5.2)
      const sb2 = opt.barometricSigmaPa ** 2;
      const correlations: Correlation[] = [];
      if (sb2 > 0) {
        const onBaro = eq.measured.filter((m) => accepted.has(m.id) && baroSigma(accepted.get(m.id)!.inst) > 0);
        for (let x = 0; x < onBaro.length; x++) {
          for (let y = x + 1; y < onBaro.length; y++) correlations.push({ a: onBaro[x].id, b: onBaro[y].id, rho: sb2 / (accepted.get(onBaro[x].id)!.sigma * accepted.get(onBaro[y].id)!.sigma) });
        }
      }
      recInput = {
        correlations,
        measured: eq.measured,
        unmeasured: eq.unmeasured,
        constraints: eq.constraints,
        confidence: opt.confidence,
        maxIterations: opt.maxIterations,
        tolerance: opt.tolerance,
      };
      res = reconcile(recInput);
    } catch (e) {
      const code = e && typeof e === 'object' && 'code' in e ? String((e as { code: unknown }).code) : 'ERROR';
      recError = { code, message: e instanceof Error ? e.message : String(e) };
    }
  }
  if (recError) {
    add(
      'reconciliation-failed',
      recError.code === 'NOT_REDUNDANT' || recError.code === 'NO_DATA' ? NOTE : ATTEND,
      [],
      recError.code === 'NOT_REDUNDANT' || recError.code === 'NO_DATA'
        ? messages.notRedundant(recError.message)
        : messages.notReconciled(recError.message),
      { code: recError.code },
    );
  }
  const scaleOf = (id: string) => SCALE[eq.vars[id]?.kind ?? 'T'];
  const suspects = new Set(res?.suspects ?? []);
  /** final (suspects removed) value of a variable, SI; readings in no balance keep their value */
  const recV = (id: string): number | null => {
    if (res && id in res.final.values) return res.final.values[id] * scaleOf(id);
    if (eq.notInBalance.includes(id)) return accepted.get(id)?.value ?? null;
    return null;
  };
  const recS = (id: string): number | null => {
    if (res && id in res.final.sigmas) return res.final.sigmas[id] * scaleOf(id);
    if (eq.notInBalance.includes(id)) return accepted.get(id)?.sigma ?? null;
    return null;
  };

  return { eq, res, recInput, recError, scaleOf, suspects, recV, recS };
}

/** Per-instrument results and the reconciliation as the analysis reports them. */
export function outputStage(c: StatesCtx) {
  const { model, accepted, excluded, readingSigma, eq, res, recError, scaleOf, suspects, recV, recS } = c;
  const redundant = new Set(res?.redundant ?? []);
  const instruments: InstrumentResult[] = model.instruments.map((i) => {
    const a = accepted.get(i.tag);
    const inRec = !!res && i.tag in res.values;
    const sc = fin(SCALE[eq.vars[i.tag]?.kind ?? 'T']) ? scaleOf(i.tag) : 1;
    const status: InstrumentResult['status'] = !a ? (excluded.has(i.tag) ? 'excluded' : 'missing') : eq.notInBalance.includes(i.tag) ? 'not-in-balance' : 'used';
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
      .filter((vi) => vi.measured ? eq.measured.some((m) => m.id === vi.id) : true)
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
      final: { chiSquare: res.final.chiSquare, dof: res.final.dof, critical: res.final.critical, passed: res.final.passed },
      ...(res.eliminationError ? { eliminationError: { ...res.eliminationError } } : {}),
      constraintTests: { ...res.constraintTests },
      correlatedCorrections: correlatedPairs(res),
      variables,
      constraints: eq.constraints.map((c) => {
        const ci = eq.info[c.id];
        return { id: c.id, kind: ci.kind, ...(ci.equipmentId ? { equipmentId: ci.equipmentId } : {}), ...(ci.pointId ? { pointId: ci.pointId } : {}), label: ci.label };
      }),
    };
  }

  return { instruments, reconciliation };
}
