/**
 * Input and output types of the round analysis. SI everywhere (Pa absolute, K, J/kg, J/(kg·K),
 * kg/s, W); the one trade unit is the heat rate, in kJ/kWh as the trade quotes it (its unit says so).
 */
import type { SteamPhase } from '../steam';
import type { Quantity } from '../units';
import type { EquipmentKind, PointPhase } from './model';
import type { Level } from './severity';

/** One reading of a round: the instrument by tag (or by its id), its value in SI absolute. */
export interface RoundReading {
  instrumentTag?: string;
  instrumentId?: string;
  /** SI, absolute for pressures (the edge converts what was typed) */
  valueSI: number;
  /** standard uncertainty in SI; from the instrument's accuracy spec when left out */
  sigma?: number;
}

export interface AnalysisOptions {
  /** confidence level of the reconciliation tests, default 0.95 */
  confidence?: number;
  /** rounds (this one included) a value must stay the same to count as stuck, default 3 (≥ 3) */
  stuckRounds?: number;
  /** standard uncertainty of the barometric pressure (Pa), added to gauge and vacuum readings; default 0 */
  barometricSigmaPa?: number;
  /** coverage factor of the plain checks (twins, saturation, balances), default 2 */
  coverage?: number;
  /** reconciliation iterations, default 50 */
  maxIterations?: number;
  /**
   * reconciliation convergence tolerance in σ units, default 1e-8 (reconcile()'s own default, 1e-10,
   * lies below the noise of the central-difference pressure derivatives of the IF97 properties)
   */
  tolerance?: number;
}

export interface RoundContext {
  /** barometric pressure of the round, Pa absolute */
  barometricPa: number;
  /** earlier rounds, oldest first, for the stuck-value check */
  previousRounds?: { readings: RoundReading[] }[];
  options?: AnalysisOptions;
}

export const FINDING_KINDS = [
  'gross-error',
  'gauge-read-as-absolute',
  'absolute-read-as-gauge',
  'twin-disagreement',
  'saturation-mismatch',
  'phase-mismatch',
  'out-of-range',
  'outside-if97',
  'stuck-value',
  'missing-reading',
  'balance-not-closed',
  'unknown-instrument',
  'invalid-reading',
  'duplicate-reading',
  'reconciliation-failed',
] as const;
export type FindingKind = (typeof FINDING_KINDS)[number];

export type Evidence = Record<string, number | string | boolean | null | readonly string[] | readonly number[]>;

export interface Finding {
  kind: FindingKind;
  /** 1 urgent, 2 attend to, 3 note (shared/cycle/severity.ts: the same direction as a work order's priority) */
  severity: Level;
  instrumentTags: string[];
  /** the instruments' ids where the model gives them */
  instrumentIds: string[];
  equipmentId?: string;
  pointId?: string;
  message: string;
  evidence: Evidence;
}

export interface PointValues {
  p: number | null;
  T: number | null;
  h: number | null;
  s: number | null;
  x: number | null;
  m: number | null;
  phase: SteamPhase | null;
}

export type PressureSource = 'measured' | 'same-as' | 'saturation' | 'assumed' | 'unmeasured';

export interface StatePointResult {
  id: string;
  label: string;
  expectedPhase: PointPhase;
  circuit: 'cycle' | 'cooling';
  pressureSource: PressureSource;
  /** the point whose pressure this one takes (samePressureAs) */
  pressureFrom?: string;
  /** from the readings (twins combined by their uncertainty); unmeasured parts null */
  measured: PointValues;
  /** after reconciliation (suspects removed); null where not determined */
  reconciled: PointValues;
  sigmas: { p: number | null; T: number | null; h: number | null; x: number | null; m: number | null };
}

export interface BalanceValues {
  in: number;
  out: number;
  /** in − out */
  residual: number;
  /** residual / max(|in|, |out|); null when both are 0 */
  relative: number | null;
}

export interface BalanceRow {
  /** constraint id in the reconciliation */
  id: string;
  kind: 'mass' | 'energy' | 'duty' | 'power' | 'enthalpy';
  label: string;
  /** kg/s for mass, W for energy, duty and power, J/kg for enthalpy */
  unit: 'kg/s' | 'W' | 'J/kg';
  /** with the readings as they are (unmeasured parts from the reconciliation) */
  measured: BalanceValues | null;
  reconciled: BalanceValues | null;
  /**
   * uncertainty of the measured residual: from the reconciliation's covariance (residual / test)
   * where the balance is a constraint of it, else propagated from the readings' σ
   */
  measuredSigma: number | null;
  /** |residual|/σ with the σ from the reconciliation's covariance of the corrections; null where not formed */
  test: number | null;
}

export interface EquipmentBalance {
  equipmentId: string;
  kind: EquipmentKind;
  label: string;
  rows: BalanceRow[];
}

export interface PerformanceFigure {
  id: string;
  kind:
    | 'isentropic-efficiency'
    | 'section-power'
    | 'pump-efficiency'
    | 'pump-power'
    | 'condenser-ttd'
    | 'condenser-itd'
    | 'condenser-duty'
    | 'cooling-water-rise'
    | 'condensate-subcooling'
    | 'heater-ttd'
    | 'heater-dca'
    | 'heater-duty'
    | 'heater-rise'
    | 'heat-absorbed'
    | 'boiler-heat'
    | 'electrical-output'
    | 'shaft-power'
    | 'thermal-efficiency'
    | 'heat-rate'
    | 'process-heat'
    | 'fuel-utilisation';
  equipmentId?: string;
  label: string;
  /** '1' for a fraction, K, W, or kJ/kWh for the heat rate */
  unit: '1' | 'K' | 'W' | 'kJ/kWh';
  /** from the reconciled state; null where it cannot be formed */
  value: number | null;
  /** from the readings as they are (a flow nobody reads taken from the reconciliation); null where a needed pressure or temperature is not read */
  measured: number | null;
  note?: string;
  /** the balanced value's uncertainty, propagated from the readings through the reconciliation (shared/cycle/figure-uncertainty.ts) */
  uncertainty?: FigureUncertainty;
}

/**
 * Uncertainty of a balanced figure: GUM law of propagation of uncertainty (JCGM 100:2008, 5.1.2)
 * with numerical sensitivity coefficients (5.1.3, note 2) through the linearised reconciliation.
 */
export interface FigureUncertainty {
  method: 'gum-lpu';
  /** standard uncertainty, in the figure's unit */
  u: number;
  /** coverage factor for 95 % (normal distribution) */
  k: number;
  /** expanded uncertainty k·u: the 95 % interval is value ± U */
  U: number;
  /** false: the interval is wider than half the figure's meaningful span ("not determinable from these instruments") */
  determinable: boolean;
  /** the span the interval is held against, in the figure's unit (1 = 0–100 % for a fraction) */
  span: number;
  /** the readings carrying the variance, largest share first (shares of u², at most three, up to 90 % together) */
  budget: { tag: string; share: number }[];
  /** not determinable: how many times smaller the σ of the readings in `budget` would have to be to make it determinable; null when those alone cannot */
  reduceBy: number | null;
}

export interface InstrumentResult {
  tag: string;
  id?: string;
  quantity: Quantity;
  pointId?: string;
  equipmentId?: string;
  status: 'used' | 'not-in-balance' | 'missing' | 'excluded';
  /** the reading (SI absolute) */
  reading: number | null;
  sigma: number | null;
  /** reconciled value (main pass) */
  reconciled: number | null;
  reconciledSigma: number | null;
  correction: number | null;
  z: number | null;
  redundant: boolean;
  suspect: boolean;
  /** best estimate with the suspects removed (for a suspect: what the rest says) */
  estimate: number | null;
  estimateSigma: number | null;
  /**
   * the sequential evidence's statistic (shared/cycle/evidence.ts): the signed normalised correction
   * (reading − reconciled)/σ(correction), positive reads high — for a suspect from the pass that
   * eliminated it, for the others from the reconciliation with the suspects removed (a gross error
   * elsewhere does not move them); null where not tested
   */
  u: number | null;
}

export interface VariableResult {
  id: string;
  kind: 'p' | 'T' | 'm' | 'h' | 'x' | 'power';
  /** SI unit of the values below */
  unit: string;
  pointId?: string;
  equipmentId?: string;
  instrumentTag?: string;
  measured: boolean;
  value: number | null;
  sigma: number | null;
  correction: number | null;
  z: number | null;
  finalValue: number | null;
  finalSigma: number | null;
  redundant: boolean;
  observable: boolean;
}

export type ReconciliationOutput =
  | {
      ok: true;
      chiSquare: number;
      dof: number;
      critical: number;
      passed: boolean;
      zCritical: number;
      iterations: number;
      /** instrument tags removed by serial elimination, in order */
      suspects: string[];
      final: { chiSquare: number; dof: number; critical: number; passed: boolean };
      eliminationError?: { code: string; message: string };
      /** |r|/σ at the readings, for balances that read only measured variables */
      constraintTests: Record<string, number>;
      /** pairs of tested instruments whose corrections correlate by |ρ| ≥ 0.3 (shared/cycle/evidence.ts) */
      correlatedCorrections: { a: string; b: string; rho: number }[];
      variables: VariableResult[];
      constraints: { id: string; kind: string; equipmentId?: string; pointId?: string; label: string }[];
    }
  | { ok: false; error: { code: string; message: string } };

export interface RoundAnalysis {
  modelId: string;
  modelVersion: string;
  barometricPa: number;
  statePoints: StatePointResult[];
  balances: EquipmentBalance[];
  performance: PerformanceFigure[];
  instruments: InstrumentResult[];
  reconciliation: ReconciliationOutput;
  findings: Finding[];
}
