/**
 * Stage 2, reconciliation: the plant equations (../equations.ts) reconciled by reconcile() (VDI 2048
 * weighted least squares, global χ² test, individual tests, elimination of what fails them). The
 * per-instrument and reconciliation output of the analysis is in ./output.ts.
 */
import { reconcile, type Correlation, type ReconcileInput, type ReconcileResult } from '../../reconcile';
import { buildEquations, SCALE, type AcceptedReading, type EquationSystem } from '../equations';
import { messages } from '../messages';
import { ATTEND, NOTE } from '../severity';
import type { BaseCtx } from './base';
import type { IntakeOut } from './intake';

/** The plant equations reconciled (VDI 2048), the barometric pressure a common input of gauge and vacuum readings. */
export function reconciliationStage(c: BaseCtx & IntakeOut) {
  const { model, opt, add, accepted, baroSigma } = c;
  const acc = new Map<string, AcceptedReading>(
    [...accepted].map(([t, r]) => [t, { tag: t, value: r.value, sigma: r.sigma }]),
  );
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
          for (let y = x + 1; y < onBaro.length; y++)
            correlations.push({
              a: onBaro[x].id,
              b: onBaro[y].id,
              rho: sb2 / (accepted.get(onBaro[x].id)!.sigma * accepted.get(onBaro[y].id)!.sigma),
            });
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

/** What the analysis knows after reconciliation. */
export type RecCtx = BaseCtx & IntakeOut & ReturnType<typeof reconciliationStage>;
