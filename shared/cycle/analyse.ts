/**
 * analyseRound: one round's readings held against the cycle, in stages (./round/), each a module
 * that reads an explicit context and adds its results to it (./round/context.ts):
 *
 *  1. intake (round/intake.ts): each reading matched to its instrument (by tag or id), its σ from the
 *     reading or the instrument's accuracy spec at its reference value (+ the barometric σ for gauge
 *     and vacuum readings); readings outside the range are noted, readings outside IF97 set aside;
 *  2. reconciliation (round/reconciliation.ts): the plant equations (equations.ts) reconciled by
 *     reconcile() (VDI 2048 weighted least squares, global χ² test, individual test, elimination of
 *     what fails it, groups the balances cannot tell apart), the barometric pressure a common input;
 *  3. states (round/states.ts) and balances (round/balances.ts) from the readings and from the
 *     reconciled values (suspects removed); performance figures (performance.ts);
 *  4. findings by kind: the reconciliation's (round/findings-reconciliation.ts: gross errors with
 *     their group and the estimate the rest of the plant gives, pressure references mixed up),
 *     declared phase contradicted (findings-phase.ts), stuck values (findings-stuck.ts), balances
 *     not closing (findings-balances.ts); the intake's out of range, outside IF97, missing. Twins
 *     and saturation are constraints, tested once by the reconciliation. Their words: messages.ts.
 *
 * Deterministic: no clock, no randomness, every list in model order or sorted; the same inputs give
 * the same output bit for bit. Never NaN: a number that cannot be formed is null.
 */
import { withUncertainty } from './figure-uncertainty';
import { performanceFigures } from './performance';
import type { RoundAnalysis, RoundContext, RoundReading } from './types';
import { validateModel } from './validate';
import {
  checkContext,
  cmp,
  CycleError,
  KIND_ORDER,
  makeBase,
  sigmaReferenceValue,
  specSigmaOf,
  type PState,
} from './round/base';
import { intakeStage } from './round/intake';
import { reconciliationStage } from './round/reconciliation';
import { outputStage } from './round/output';
import { statesStage } from './round/states';
import { balancesStage } from './round/balances';
import { grossErrorFindings } from './round/findings-reconciliation';
import { phaseFindings } from './round/findings-phase';
import { stuckFindings } from './round/findings-stuck';
import { balanceFindings } from './round/findings-balances';

export { CycleError, sigmaReferenceValue, specSigmaOf };
export type { CycleErrorCode } from './round/base';

/** Analyses one round. Throws CycleError only for a broken model or context; everything about the readings becomes a finding. */
export function analyseRound(
  modelIn: unknown,
  readings: readonly RoundReading[],
  context: RoundContext,
): RoundAnalysis {
  const v = validateModel(modelIn);
  if (!v.ok) {
    const first = v.errors[0];
    throw new CycleError(
      'INVALID_MODEL',
      `the cycle model is invalid: ${first.path}: ${first.message}${v.errors.length > 1 ? ` (and ${v.errors.length - 1} more)` : ''}`,
      { errors: v.errors },
    );
  }
  const model = v.model;
  const opt = checkContext(context);
  if (!Array.isArray(readings))
    throw new CycleError('INVALID_READINGS', 'readings must be an array of { instrumentTag, valueSI, sigma? }');
  const base = makeBase(model, opt, context);
  const afterIntake = { ...base, ...intakeStage(base, readings) };
  const afterRec = { ...afterIntake, ...reconciliationStage(afterIntake) };
  const afterStates = { ...afterRec, ...statesStage(afterRec) };
  const afterBalances = { ...afterStates, ...balancesStage(afterStates) };
  const { getMeas, getRec, recPower, measPower, eq, res, recInput, accepted } = afterStates;
  // measured basis: pressures, temperatures and enthalpies as read; a flow nobody reads from the reconciliation
  const getMeasFlows = (id: string): PState => {
    const m = getMeas(id);
    return m.m !== null ? m : { ...m, m: getRec(id).m, sm: getRec(id).sm };
  };
  const figures = performanceFigures(model, getRec, recPower, getMeasFlows, measPower);
  const performance =
    res && recInput
      ? withUncertainty({ model, eq, reconcileInput: recInput, result: res, accepted, figures })
      : figures;

  const c = { ...afterBalances, performance };
  grossErrorFindings(c);
  phaseFindings(c);
  stuckFindings(c);
  balanceFindings(c);
  const { findings, b, statePoints, balances } = c;
  findings.sort(
    (a, c) =>
      a.severity - c.severity ||
      KIND_ORDER.get(a.kind)! - KIND_ORDER.get(c.kind)! ||
      cmp(a.instrumentTags[0] ?? '', c.instrumentTags[0] ?? '') ||
      cmp(a.equipmentId ?? a.pointId ?? '', c.equipmentId ?? c.pointId ?? '') ||
      cmp(a.message, c.message),
  );

  const { instruments, reconciliation } = outputStage(c);
  return {
    modelId: model.id,
    modelVersion: model.version,
    barometricPa: b,
    statePoints,
    balances,
    performance,
    instruments,
    reconciliation,
    findings,
  };
}
