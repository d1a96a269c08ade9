/**
 * Generic data reconciliation: weighted least squares under equality constraints, with gross-error
 * tests and serial elimination.
 *
 * Method (VDI 2048 part 1; Crowe, Campos & Hrymak 1983; Narasimhan & Jordache 1999;
 * Romagnoli & Sánchez 2000):
 *  - minimise (x − x_m)ᵀ Σ⁻¹ (x − x_m) subject to f(x, u) = 0, x measured, u unmeasured;
 *  - nonlinear f by successive linearisation: at the current point f + A·Δx + B·Δu = 0 with the
 *    Jacobians A = ∂f/∂x, B = ∂f/∂u (analytic where the constraint gives `grad`, else central finite
 *    differences with a step of ε^(1/3)·max(|value|, σ) for measured and ε^(1/3)·max(|value|, |guess|, 1)
 *    for unmeasured variables, perturbing only the variables the constraint reads);
 *  - unmeasured variables eliminated by projection: QR with column pivoting of B gives its rank;
 *    the last rows of Qᵀ span the null space of Bᵀ and turn the linearised constraints into reduced
 *    constraints G·x = c on the measured variables alone; the leading rows give the unmeasured ones;
 *  - WLS step x̂ = x_m − Σ Gᵀ (G Σ Gᵀ)⁻¹ (G x_m − c) on a row-independent subset of G;
 *  - converged when max |Δx_i|/σ_i, the scaled change of every observable unmeasured variable and
 *    the scaled constraint residual are all below `tolerance` (default 1e-10; a round-off floor of
 *    16 ε·|value| applies), at most `maxIterations` (default 50) linearisations.
 *
 * Scaling used throughout (it does not change the solution, only conditioning and tolerances):
 * measured variables in units of their σ (ξ = x/σ, whose covariance is the correlation matrix),
 * each constraint row divided by the norm of its scaled gradient (so a residual reads in σ units),
 * each unmeasured column of B normalised before the pivoted QR.
 *
 * Classification: a measured variable is redundant iff its column in the reduced matrix G is
 * non-zero; an unmeasured variable is observable iff it is fixed by the measured ones, i.e. its row
 * of the null-space basis of B is zero (B·P = Q·[R11 R12; 0 0], basis P·[−R11⁻¹R12; I]).
 *
 * Tests:
 *  - global: χ² = eᵀ Σ⁻¹ e (e = corrections) against the χ²(dof) quantile at `confidence`,
 *    dof = rank of G (VDI 2048 quality criterion);
 *  - per measurement: z_i = |e_i| / sqrt(V_e,ii), V_e = Σ Gᵀ (G Σ Gᵀ)⁻¹ G Σ, against the two-sided
 *    normal quantile Φ⁻¹(1 − (1 − confidence)/2) (VDI 2048 convention: 1.96 at 95 %), returned as
 *    `zCritical`;
 *  - per constraint (constraints that read no unmeasured variable): |r_k| / sqrt(S_kk) with
 *    r = f(x_m), S = A Σ Aᵀ at the measured values;
 *  - serial elimination (VDI 2048-1:2017 §7, the individual test as the removal criterion): while
 *    the global test fails, dof ≥ 2 (each removed redundant measurement lowers dof by one, so the
 *    problem stays redundant) and the largest z exceeds `zCritical`, that measurement (ties: largest
 *    |e|/σ) is treated as unmeasured and the problem reconciled again. A measurement below the
 *    individual test's limit is never removed, however the global test ends;
 *  - groups: measurements whose corrections correlate by |ρ| ≥ GROUP_CORRELATION (ρ_ij =
 *    V_e,ij/√(V_e,ii·V_e,jj)) are near-inseparable: a bias on one moves the other's test value to
 *    within a factor ρ of its own. Each suspect carries its group (`suspectGroups`): the balances
 *    cannot tell which of them is wrong. Threshold 0.95: the test values of j and i under a bias
 *    with expected test value δ on j differ by N(δ(1−ρ), 2(1−ρ)), so the wrong one of the pair wins
 *    with probability Φ(−δ·√((1−ρ)/2)); at δ = 10 (a gross error) that is ≥ 5 % once ρ ≥ 0.946
 *    (Narasimhan & Jordache 1999 ch. 7 on equivalent sets of gross errors, from memory).
 *
 * Covariance of the reconciled values (VDI 2048-1 eq. for the a-posteriori covariance,
 * S_x̂ = S_x − V_e with V_e = S_x Gᵀ (G S_x Gᵀ)⁻¹ G S_x, carried to the observable unmeasured
 * variables through their linear dependence on the measured ones): `covariance`, in the units of
 * the values given (products of the two variables' units), over `covariance.ids` (measured, then
 * observable unmeasured, in input order), row-major.
 *
 * Pure TypeScript, no Node built-ins: runs in the browser and on the phone.
 */
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { jStat } from 'jstat';
import { applyQt, pivotedQr, solveR11, type PivotedQr } from './pivoted-qr';

export type ReconcileErrorCode =
  | 'INVALID_ID'
  | 'DUPLICATE_ID'
  | 'INVALID_VALUE'
  | 'INVALID_SIGMA'
  | 'INVALID_CORRELATION'
  | 'INVALID_CONFIDENCE'
  | 'INVALID_OPTION'
  | 'INVALID_CONSTRAINT'
  | 'NO_CONSTRAINTS'
  | 'UNKNOWN_VARIABLE'
  | 'CONSTRAINT_FAILED'
  | 'NOT_FINITE'
  | 'COVARIANCE_NOT_PD'
  | 'SINGULAR'
  | 'INCONSISTENT'
  | 'NOT_REDUNDANT'
  | 'NOT_CONVERGED';

export class ReconcileError extends Error {
  readonly code: ReconcileErrorCode;
  readonly details: Record<string, unknown>;
  constructor(code: ReconcileErrorCode, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = 'ReconcileError';
    this.code = code;
    this.details = details;
  }
}

export type Values = Readonly<Record<string, number>>;

export interface Measurement {
  id: string;
  value: number;
  /** standard deviation, same unit as value, > 0 */
  sigma: number;
}

export interface UnmeasuredVariable {
  id: string;
  /** starting value for the linearisation (default 1); give one of the right magnitude for nonlinear constraints */
  guess?: number;
}

export interface Constraint {
  id: string;
  /** residual, zero when the constraint holds */
  f: (v: Values) => number;
  /** optional analytic gradient: ∂f/∂id for each variable f depends on */
  grad?: (v: Values) => Record<string, number>;
}

export interface Correlation {
  a: string;
  b: string;
  rho: number;
}

export interface ReconcileInput {
  measured: Measurement[];
  unmeasured?: UnmeasuredVariable[];
  constraints: Constraint[];
  correlations?: Correlation[];
  /** confidence level of the tests, default 0.95 */
  confidence?: number;
  /** default 50 */
  maxIterations?: number;
  /** convergence tolerance in σ units, default 1e-10 */
  tolerance?: number;
}

export interface ReconcileFinal {
  values: Record<string, number>;
  sigmas: Record<string, number>;
  /** reconciled − measured, and |correction|/σ(correction), of the measurements still measured */
  corrections: Record<string, number>;
  z: Record<string, number | null>;
  chiSquare: number;
  dof: number;
  critical: number;
  passed: boolean;
}

/** Correction correlation at or above which two measurements are one group (see the file comment). */
export const GROUP_CORRELATION = 0.95;

export interface Covariance {
  ids: string[];
  /** ids.length² entries, row-major, in the units of the input values (products of the two variables' units) */
  matrix: number[];
}

export interface ReconcileResult {
  /** reconciled measured values and solved (observable) unmeasured ones; unobservable ones are absent */
  values: Record<string, number>;
  /** standard deviation of each reconciled value */
  sigmas: Record<string, number>;
  /** reconciled − measured */
  corrections: Record<string, number>;
  /** |correction| / σ(correction); null where not redundant */
  z: Record<string, number | null>;
  /** two-sided normal quantile the z values are held against */
  zCritical: number;
  chiSquare: number;
  dof: number;
  critical: number;
  passed: boolean;
  /** |r_k| / sqrt(S_kk) at the measured values, for constraints that read no unmeasured variable */
  constraintTests: Record<string, number>;
  /** measurements removed by serial elimination, in order */
  suspects: string[];
  /** for each suspect (same order): it and the redundant measurements whose corrections correlate with its by |ρ| ≥ GROUP_CORRELATION, it first */
  suspectGroups: string[][];
  /** covariance of the corrections V_e (main reconciliation), input units, over the measured ids; correlations by correlationIn() */
  correctionCovariance: Covariance;
  /** covariance of the reconciled values (main reconciliation), input units; in analyseRound the values are scaled (shared/cycle SCALE) */
  covariance: Covariance;
  /** reconciliation with every suspect treated as unmeasured (equals the main result when there is none) */
  final: ReconcileFinal;
  /** each suspect's signed test value, (measured − reconciled)/σ(correction), in the pass that eliminated it */
  eliminatedU: Record<string, number>;
  /** set when serial elimination stopped because the next reconciliation failed */
  eliminationError?: { code: ReconcileErrorCode; message: string };
  iterations: number;
  redundant: string[];
  observable: string[];
  unobservable: string[];
}

// ---------------------------------------------------------------------------------------------
// linear constraints

/** Σ coeffs[id]·v[id] − rhs = 0, with its analytic gradient. */
export function linear(id: string, coeffs: Record<string, number>, rhs = 0): Constraint {
  if (typeof id !== 'string' || id.length === 0) {
    throw new ReconcileError('INVALID_ID', `linear constraint id must be a non-empty string, got ${String(id)}`);
  }
  const entries = Object.entries(coeffs ?? {});
  if (entries.length === 0) {
    throw new ReconcileError('INVALID_CONSTRAINT', `linear constraint "${id}" has no coefficients`, { constraint: id });
  }
  for (const [k, c] of entries) {
    if (!Number.isFinite(c)) {
      throw new ReconcileError(
        'INVALID_CONSTRAINT',
        `linear constraint "${id}": coefficient of "${k}" is ${c}, must be finite`,
        {
          constraint: id,
          variable: k,
          value: c,
        },
      );
    }
  }
  if (!Number.isFinite(rhs)) {
    throw new ReconcileError('INVALID_CONSTRAINT', `linear constraint "${id}": rhs is ${rhs}, must be finite`, {
      constraint: id,
      value: rhs,
    });
  }
  const frozen = Object.freeze(Object.fromEntries(entries));
  return {
    id,
    f: (v) => {
      let s = -rhs;
      for (const [k, c] of entries) s += c * v[k];
      return s;
    },
    grad: () => frozen,
  };
}

// ---------------------------------------------------------------------------------------------
// problem set-up and validation

const EPS = 2.220446049250313e-16;
const FD_STEP = Math.cbrt(EPS); // ≈ 6.06e-6, optimal for central differences
const ROUNDOFF = 16 * EPS;
const RANK_TOL = 1e-9;
const INCONSISTENCY_TOL = 1e-7;
/**
 * Steps and constraint residuals (σ units) that stop shrinking below this many ε of the largest
 * correction are a round-off floor (measured: ~100 ε of the correction on well-conditioned networks).
 */
const FLOOR_FACTOR = 1e4;

interface VarRef {
  kind: 'm' | 'u';
  i: number;
}

interface Problem {
  mIds: string[];
  xm: Float64Array;
  sig: Float64Array;
  /** correlation matrix of the active measured variables (row-major), null = identity */
  corr: Float64Array | null;
  corrChol: CholeskyDecomposition | null;
  uIds: string[];
  guess: Float64Array;
  constraints: Constraint[];
  index: Map<string, VarRef>;
  tol: number;
  maxIter: number;
}

function checkId(id: unknown, what: string): asserts id is string {
  if (typeof id !== 'string' || id.length === 0 || id === '__proto__') {
    throw new ReconcileError(
      'INVALID_ID',
      `${what} id must be a non-empty string (not "__proto__"), got ${JSON.stringify(id)}`,
      {
        id,
      },
    );
  }
}

interface Validated {
  measured: Measurement[];
  unmeasured: { id: string; guess: number }[];
  constraints: Constraint[];
  correlations: Correlation[];
  confidence: number;
  maxIter: number;
  tol: number;
}

function validate(input: ReconcileInput): Validated {
  if (!input || typeof input !== 'object')
    throw new ReconcileError('INVALID_OPTION', 'reconcile() needs an input object');
  const measured = input.measured ?? [];
  const unmeasuredIn = input.unmeasured ?? [];
  const constraints = input.constraints ?? [];
  const correlations = input.correlations ?? [];
  if (!Array.isArray(measured)) throw new ReconcileError('INVALID_OPTION', 'measured must be an array');
  if (!Array.isArray(unmeasuredIn)) throw new ReconcileError('INVALID_OPTION', 'unmeasured must be an array');
  if (!Array.isArray(constraints)) throw new ReconcileError('INVALID_OPTION', 'constraints must be an array');
  if (!Array.isArray(correlations)) throw new ReconcileError('INVALID_OPTION', 'correlations must be an array');
  const confidence = input.confidence ?? 0.95;
  if (!Number.isFinite(confidence) || confidence <= 0 || confidence >= 1) {
    throw new ReconcileError('INVALID_CONFIDENCE', `confidence is ${confidence}, must lie in (0, 1)`, {
      value: confidence,
    });
  }
  const maxIter = input.maxIterations ?? 50;
  if (!Number.isInteger(maxIter) || maxIter < 1) {
    throw new ReconcileError('INVALID_OPTION', `maxIterations is ${maxIter}, must be an integer ≥ 1`, {
      value: maxIter,
    });
  }
  const tol = input.tolerance ?? 1e-10;
  if (!Number.isFinite(tol) || tol <= 0) {
    throw new ReconcileError('INVALID_OPTION', `tolerance is ${tol}, must be finite and > 0`, { value: tol });
  }
  const seen = new Set<string>();
  const claim = (id: string, what: string) => {
    if (seen.has(id)) throw new ReconcileError('DUPLICATE_ID', `duplicate variable id "${id}" (${what})`, { id });
    seen.add(id);
  };
  for (const m of measured) {
    checkId(m?.id, 'measured');
    claim(m.id, 'measured');
    if (typeof m.value !== 'number' || !Number.isFinite(m.value)) {
      throw new ReconcileError('INVALID_VALUE', `measured "${m.id}": value is ${m.value}, must be a finite number`, {
        id: m.id,
        value: m.value,
      });
    }
    if (typeof m.sigma !== 'number' || !Number.isFinite(m.sigma) || m.sigma <= 0) {
      throw new ReconcileError('INVALID_SIGMA', `measured "${m.id}": sigma is ${m.sigma}, must be finite and > 0`, {
        id: m.id,
        value: m.sigma,
      });
    }
  }
  const unmeasured = unmeasuredIn.map((u) => {
    checkId(u?.id, 'unmeasured');
    claim(u.id, 'unmeasured');
    const guess = u.guess ?? 1;
    if (typeof guess !== 'number' || !Number.isFinite(guess)) {
      throw new ReconcileError('INVALID_VALUE', `unmeasured "${u.id}": guess is ${u.guess}, must be a finite number`, {
        id: u.id,
        value: u.guess,
      });
    }
    return { id: u.id, guess };
  });
  if (constraints.length === 0)
    throw new ReconcileError('NO_CONSTRAINTS', 'no constraints given: nothing to reconcile');
  const cIds = new Set<string>();
  for (const c of constraints) {
    checkId(c?.id, 'constraint');
    if (cIds.has(c.id)) throw new ReconcileError('DUPLICATE_ID', `duplicate constraint id "${c.id}"`, { id: c.id });
    cIds.add(c.id);
    if (typeof c.f !== 'function')
      throw new ReconcileError('INVALID_CONSTRAINT', `constraint "${c.id}": f must be a function`, {
        constraint: c.id,
      });
    if (c.grad !== undefined && typeof c.grad !== 'function') {
      throw new ReconcileError('INVALID_CONSTRAINT', `constraint "${c.id}": grad must be a function when given`, {
        constraint: c.id,
      });
    }
  }
  const mSet = new Set(measured.map((m) => m.id));
  const pairs = new Set<string>();
  for (const r of correlations) {
    const { a, b, rho } = r ?? ({} as Correlation);
    for (const id of [a, b]) {
      if (!mSet.has(id)) {
        throw new ReconcileError('INVALID_CORRELATION', `correlation ${a}–${b}: "${id}" is not a measured variable`, {
          a,
          b,
          rho,
        });
      }
    }
    if (a === b) throw new ReconcileError('INVALID_CORRELATION', `correlation of "${a}" with itself`, { a, b, rho });
    if (typeof rho !== 'number' || !Number.isFinite(rho) || rho <= -1 || rho >= 1) {
      throw new ReconcileError('INVALID_CORRELATION', `correlation ${a}–${b}: rho is ${rho}, must lie in (-1, 1)`, {
        a,
        b,
        rho,
      });
    }
    const key = a < b ? `${a}\u0000${b}` : `${b}\u0000${a}`;
    if (pairs.has(key))
      throw new ReconcileError('INVALID_CORRELATION', `correlation ${a}–${b} given twice`, { a, b, rho });
    pairs.add(key);
  }
  return { measured, unmeasured, constraints, correlations, confidence, maxIter, tol };
}

function buildProblem(v: Validated, asUnmeasured: Map<string, number>): Problem {
  const active = v.measured.filter((m) => !asUnmeasured.has(m.id));
  const mIds = active.map((m) => m.id);
  const n = mIds.length;
  const xm = Float64Array.from(active.map((m) => m.value));
  const sig = Float64Array.from(active.map((m) => m.sigma));
  const uList = [
    ...v.unmeasured,
    ...v.measured.filter((m) => asUnmeasured.has(m.id)).map((m) => ({ id: m.id, guess: asUnmeasured.get(m.id)! })),
  ];
  const uIds = uList.map((u) => u.id);
  const guess = Float64Array.from(uList.map((u) => u.guess));
  const index = new Map<string, VarRef>();
  mIds.forEach((id, i) => index.set(id, { kind: 'm', i }));
  uIds.forEach((id, i) => index.set(id, { kind: 'u', i }));
  let corr: Float64Array | null = null;
  let corrChol: CholeskyDecomposition | null = null;
  const activeCorr = v.correlations.filter((c) => !asUnmeasured.has(c.a) && !asUnmeasured.has(c.b) && c.rho !== 0);
  if (activeCorr.length > 0) {
    corr = new Float64Array(n * n);
    for (let i = 0; i < n; i++) corr[i * n + i] = 1;
    for (const c of activeCorr) {
      const i = index.get(c.a)!.i;
      const j = index.get(c.b)!.i;
      corr[i * n + j] = c.rho;
      corr[j * n + i] = c.rho;
    }
    corrChol = new CholeskyDecomposition(Matrix.from1DArray(n, n, corr));
    if (!corrChol.isPositiveDefinite()) {
      throw new ReconcileError(
        'COVARIANCE_NOT_PD',
        'the correlations given do not form a positive-definite covariance matrix',
        {
          correlations: activeCorr,
        },
      );
    }
  }
  return {
    mIds,
    xm,
    sig,
    corr,
    corrChol,
    uIds,
    guess,
    constraints: v.constraints,
    index,
    tol: v.tol,
    maxIter: v.maxIter,
  };
}

// ---------------------------------------------------------------------------------------------
// constraint evaluation and Jacobians

interface System {
  f: Float64Array;
  /** m × n, ∂f/∂x */
  a: Float64Array;
  /** m × q, ∂f/∂u */
  b: Float64Array;
  /** per row: Σ|terms| estimate for the residual round-off floor */
  mag: Float64Array;
  /** per row: whether the constraint reads an unmeasured variable */
  readsUnmeasured: Uint8Array;
}

function finiteOrThrow(val: unknown, c: Constraint, what: string, v: Record<string, number>): number {
  if (typeof val !== 'number' || !Number.isFinite(val)) {
    throw new ReconcileError('NOT_FINITE', `constraint "${c.id}" gave ${String(val)} ${what}`, {
      constraint: c.id,
      values: { ...v },
    });
  }
  return val;
}

function callF(c: Constraint, arg: Values): unknown {
  try {
    return c.f(arg);
  } catch (e) {
    if (e instanceof ReconcileError) throw e;
    throw new ReconcileError(
      'CONSTRAINT_FAILED',
      `constraint "${c.id}" threw: ${e instanceof Error ? e.message : String(e)}`,
      { constraint: c.id },
    );
  }
}

function evaluate(p: Problem, x: Float64Array, u: Float64Array): System {
  const n = p.mIds.length;
  const q = p.uIds.length;
  const m = p.constraints.length;
  const v: Record<string, number> = {};
  for (let i = 0; i < n; i++) v[p.mIds[i]] = x[i];
  for (let j = 0; j < q; j++) v[p.uIds[j]] = u[j];
  const scale = (ref: VarRef): number =>
    ref.kind === 'm'
      ? Math.max(Math.abs(x[ref.i]), p.sig[ref.i])
      : Math.max(Math.abs(u[ref.i]), Math.abs(p.guess[ref.i]), 1);
  const f = new Float64Array(m);
  const a = new Float64Array(m * n);
  const b = new Float64Array(m * q);
  const mag = new Float64Array(m);
  const readsUnmeasured = new Uint8Array(m);
  let deps = new Set<string>();
  let current: Constraint = p.constraints[0];
  const recorder = new Proxy(v, {
    get(target, key) {
      if (typeof key !== 'string') return undefined;
      if (!p.index.has(key)) {
        throw new ReconcileError(
          'UNKNOWN_VARIABLE',
          `constraint "${current.id}" reads "${key}", which is neither measured nor unmeasured`,
          {
            constraint: current.id,
            variable: key,
          },
        );
      }
      deps.add(key);
      return target[key];
    },
    has(_target, key) {
      return typeof key === 'string' && p.index.has(key);
    },
    set() {
      throw new ReconcileError('INVALID_CONSTRAINT', `constraint "${current.id}" tried to write to its input values`, {
        constraint: current.id,
      });
    },
  });
  for (let k = 0; k < m; k++) {
    const c = p.constraints[k];
    current = c;
    deps = new Set<string>();
    const fk = finiteOrThrow(callF(c, recorder), c, 'at the current point', v);
    f[k] = fk;
    let mk = Math.abs(fk);
    const put = (key: string, d: number) => {
      const ref = p.index.get(key);
      if (!ref) {
        throw new ReconcileError(
          'UNKNOWN_VARIABLE',
          `constraint "${c.id}": gradient names "${key}", which is neither measured nor unmeasured`,
          {
            constraint: c.id,
            variable: key,
          },
        );
      }
      if (!Number.isFinite(d)) {
        throw new ReconcileError('NOT_FINITE', `constraint "${c.id}": derivative with respect to "${key}" is ${d}`, {
          constraint: c.id,
          variable: key,
        });
      }
      if (ref.kind === 'm') a[k * n + ref.i] = d;
      else {
        b[k * q + ref.i] = d;
        if (d !== 0) readsUnmeasured[k] = 1;
      }
      mk += Math.abs(d * v[key]);
    };
    if (c.grad) {
      let g: Record<string, number>;
      try {
        g = c.grad(v);
      } catch (e) {
        throw new ReconcileError(
          'CONSTRAINT_FAILED',
          `gradient of constraint "${c.id}" threw: ${e instanceof Error ? e.message : String(e)}`,
          {
            constraint: c.id,
          },
        );
      }
      for (const key of Object.keys(g)) put(key, g[key]);
    } else {
      for (const key of deps) {
        const ref = p.index.get(key)!;
        const x0 = v[key];
        const h = FD_STEP * scale(ref);
        const xp = x0 + h;
        const xn = x0 - h;
        v[key] = xp;
        const fp = finiteOrThrow(callF(c, v), c, `with "${key}" = ${xp} (finite-difference step)`, v);
        v[key] = xn;
        const fn = finiteOrThrow(callF(c, v), c, `with "${key}" = ${xn} (finite-difference step)`, v);
        v[key] = x0;
        put(key, (fp - fn) / (xp - xn));
      }
    }
    for (const key of deps) if (p.index.get(key)!.kind === 'u') readsUnmeasured[k] = 1;
    mag[k] = mk;
  }
  return { f, a, b, mag, readsUnmeasured };
}

// ---------------------------------------------------------------------------------------------
// one linearised WLS step

interface Linearisation {
  /** step in scaled measured coordinates ξ = x/σ */
  dxi: Float64Array;
  /** step of the unmeasured variables (SI) */
  du: Float64Array;
  /** max scaled residual and its round-off floor */
  resOk: boolean;
  maxRes: number;
  /** column norms of the row-scaled B (0 for a variable in no constraint) */
  cn: Float64Array;
  qrB: PivotedQr;
  /** Q1ᵀ·Ã, rank(B) × n */
  t1: Float64Array;
  /** reduced constraint matrix G = Q2ᵀ·Ã, nr × n, and its row-independent subset */
  g: Float64Array;
  nr: number;
  gr: Matrix | null;
  /** K = C·Grᵀ (n × dof) */
  k: Matrix | null;
  cholM: CholeskyDecomposition | null;
  dof: number;
  observableU: boolean[];
  redundantX: boolean[];
}

function linearise(p: Problem, x: Float64Array, u: Float64Array): Linearisation {
  const n = p.mIds.length;
  const q = p.uIds.length;
  const sys = evaluate(p, x, u);
  const m0 = p.constraints.length;
  // row scaling; rows with an all-zero gradient are dropped when satisfied, refused otherwise
  const rows: number[] = [];
  const w: number[] = [];
  let maxRes = 0;
  let resOk = true;
  for (let k = 0; k < m0; k++) {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const e = sys.a[k * n + i] * p.sig[i];
      s += e * e;
    }
    for (let j = 0; j < q; j++) {
      const e = sys.b[k * q + j] * Math.max(Math.abs(u[j]), Math.abs(p.guess[j]), 1);
      s += e * e;
    }
    if (s === 0) {
      if (sys.f[k] === 0) continue;
      throw new ReconcileError(
        'SINGULAR',
        `constraint "${p.constraints[k].id}" has a zero gradient with respect to every variable at the current point, residual ${sys.f[k]}: it cannot be met by adjusting the variables`,
        { constraint: p.constraints[k].id, residual: sys.f[k] },
      );
    }
    const wk = 1 / Math.sqrt(s);
    rows.push(k);
    w.push(wk);
    const res = Math.abs(sys.f[k]) * wk;
    if (res > maxRes) maxRes = res;
    if (res > p.tol && res > ROUNDOFF * sys.mag[k] * wk) resOk = false;
  }
  const m = rows.length;
  const width = n + 1;
  const T = new Float64Array(m * width); // [Ã | f̃]
  const bn = new Float64Array(m * q);
  for (let r = 0; r < m; r++) {
    const k = rows[r];
    const wk = w[r];
    for (let i = 0; i < n; i++) T[r * width + i] = sys.a[k * n + i] * p.sig[i] * wk;
    T[r * width + n] = sys.f[k] * wk;
    for (let j = 0; j < q; j++) bn[r * q + j] = sys.b[k * q + j] * wk;
  }
  const cn = new Float64Array(q);
  for (let j = 0; j < q; j++) {
    let s = 0;
    for (let r = 0; r < m; r++) s += bn[r * q + j] * bn[r * q + j];
    cn[j] = Math.sqrt(s);
  }
  for (let j = 0; j < q; j++) if (cn[j] > 0) for (let r = 0; r < m; r++) bn[r * q + j] /= cn[j];
  const qrB = pivotedQr(bn, m, q, RANK_TOL);
  applyQt(qrB, T, width);
  const rB = qrB.rank;
  const nr = m - rB;
  const t1 = new Float64Array(rB * n);
  const t1f = new Float64Array(rB);
  for (let r = 0; r < rB; r++) {
    for (let i = 0; i < n; i++) t1[r * n + i] = T[r * width + i];
    t1f[r] = T[r * width + n];
  }
  const g = new Float64Array(nr * n);
  const gf = new Float64Array(nr);
  for (let r = 0; r < nr; r++) {
    for (let i = 0; i < n; i++) g[r * n + i] = T[(rB + r) * width + i];
    gf[r] = T[(rB + r) * width + n];
  }
  // reduced residual at the measured values: r = G·(ξ_m − ξ̂) + g
  const d0 = new Float64Array(n);
  for (let i = 0; i < n; i++) d0[i] = (p.xm[i] - x[i]) / p.sig[i];
  const red = new Float64Array(nr);
  for (let r = 0; r < nr; r++) {
    let s = gf[r];
    for (let i = 0; i < n; i++) s += g[r * n + i] * d0[i];
    red[r] = s;
  }
  // row-independent subset of G: pivoted QR of Gᵀ
  const gt = new Float64Array(n * nr);
  for (let r = 0; r < nr; r++) for (let i = 0; i < n; i++) gt[i * nr + r] = g[r * n + i];
  const qrG = pivotedQr(gt, n, nr, RANK_TOL);
  const dof = qrG.rank;
  const sel = Array.from(qrG.perm.slice(0, dof));
  const delta = new Float64Array(n); // correction in σ units
  let gr: Matrix | null = null;
  let kMat: Matrix | null = null;
  let cholM: CholeskyDecomposition | null = null;
  if (dof > 0) {
    const grData = new Float64Array(dof * n);
    sel.forEach((r, s) => grData.set(g.subarray(r * n, r * n + n), s * n));
    gr = Matrix.from1DArray(dof, n, grData);
    let mMat: Matrix;
    if (p.corr) {
      const c = Matrix.from1DArray(n, n, p.corr);
      kMat = c.mmul(gr.transpose());
      const g0 = gr.mmul(kMat);
      mMat = g0.add(g0.transpose()).mul(0.5); // exact symmetry for the Cholesky factorisation
    } else {
      kMat = gr.transpose();
      mMat = gr.mmulByTranspose();
    }
    cholM = new CholeskyDecomposition(mMat);
    if (!cholM.isPositiveDefinite()) {
      throw new ReconcileError('SINGULAR', 'the reduced constraint matrix G·Σ·Gᵀ is numerically singular', { dof });
    }
    const rs = Matrix.columnVector(sel.map((r) => red[r]));
    const lambda = cholM.solve(rs);
    const dm = kMat.mmul(lambda);
    for (let i = 0; i < n; i++) delta[i] = -dm.get(i, 0);
  }
  // dependent reduced rows must agree with the independent ones
  if (dof < nr) {
    let scale = 1;
    for (let r = 0; r < nr; r++) scale = Math.max(scale, Math.abs(red[r]));
    const selected = new Set(sel);
    for (let r = 0; r < nr; r++) {
      if (selected.has(r)) continue;
      let s = red[r];
      for (let i = 0; i < n; i++) s += g[r * n + i] * delta[i];
      if (Math.abs(s) > INCONSISTENCY_TOL * scale) {
        throw new ReconcileError(
          'INCONSISTENT',
          `the constraints are linearly dependent and contradict each other (left-over residual ${s.toExponential(3)} in σ units)`,
          { residual: s },
        );
      }
    }
  }
  const dxi = new Float64Array(n);
  for (let i = 0; i < n; i++) dxi[i] = d0[i] + delta[i];
  // unmeasured: R11·Δη_basic = −(Q1ᵀf̃ + Q1ᵀÃ·Δξ), free (unobservable) part held
  const du = new Float64Array(q);
  if (rB > 0) {
    const rhs = new Float64Array(rB);
    for (let r = 0; r < rB; r++) {
      let s = t1f[r];
      for (let i = 0; i < n; i++) s += t1[r * n + i] * dxi[i];
      rhs[r] = -s;
    }
    const y = solveR11(qrB, rhs, 1);
    for (let r = 0; r < rB; r++) {
      const j = qrB.perm[r];
      du[j] = y[r] / cn[j];
    }
  }
  // observability: basic variable k is observable iff row k of R11⁻¹·R12 is zero
  const observableU = new Array<boolean>(q).fill(false);
  if (rB > 0) {
    const free = q - rB;
    let x12: Float64Array | null = null;
    if (free > 0) {
      const r12 = new Float64Array(rB * free);
      for (let r = 0; r < rB; r++) for (let j = 0; j < free; j++) r12[r * free + j] = qrB.rcols[rB + j][r];
      x12 = solveR11(qrB, r12, free);
    }
    for (let r = 0; r < rB; r++) {
      let ok = true;
      if (x12) for (let j = 0; j < free; j++) if (Math.abs(x12[r * free + j]) > RANK_TOL) ok = false;
      observableU[qrB.perm[r]] = ok;
    }
  }
  const redundantX = new Array<boolean>(n).fill(false);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let r = 0; r < nr; r++) s += g[r * n + i] * g[r * n + i];
    redundantX[i] = Math.sqrt(s) > RANK_TOL;
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(dxi[i]))
      throw new ReconcileError('NOT_FINITE', `step for "${p.mIds[i]}" is not finite`, { id: p.mIds[i] });
  }
  for (let j = 0; j < q; j++) {
    if (!Number.isFinite(du[j]))
      throw new ReconcileError('NOT_FINITE', `step for "${p.uIds[j]}" is not finite`, { id: p.uIds[j] });
  }
  return { dxi, du, resOk, maxRes, cn, qrB, t1, g, nr, gr, k: kMat, cholM, dof, observableU, redundantX };
}

// ---------------------------------------------------------------------------------------------
// iteration and statistics

/** L⁻¹·B for lower-triangular L (d × d) and B (d × w), both row-major. */
function lowerSolve(l: Float64Array, b: Float64Array, d: number, w: number): Float64Array {
  const y = Float64Array.from(b);
  for (let i = 0; i < d; i++) {
    const off = i * w;
    for (let k = 0; k < i; k++) {
      const lik = l[i * d + k];
      if (lik === 0) continue;
      const ok = k * w;
      for (let j = 0; j < w; j++) y[off + j] -= lik * y[ok + j];
    }
    const dii = l[i * d + i];
    for (let j = 0; j < w; j++) y[off + j] /= dii;
  }
  return y;
}

/** squared norm of each column of a (rows × cols, row-major) */
function columnNorms2(a: Float64Array, rows: number, cols: number): Float64Array {
  const out = new Float64Array(cols);
  for (let r = 0; r < rows; r++) {
    const off = r * cols;
    for (let j = 0; j < cols; j++) out[j] += a[off + j] * a[off + j];
  }
  return out;
}

interface Core {
  p: Problem;
  x: Float64Array;
  u: Float64Array;
  iterations: number;
  lin: Linearisation;
  values: Record<string, number>;
  sigmas: Record<string, number>;
  corrections: Record<string, number>;
  z: Record<string, number | null>;
  zByIndex: (number | null)[];
  chiSquare: number;
  dof: number;
  critical: number;
  passed: boolean;
  redundant: string[];
  observable: string[];
  unobservable: string[];
  /** V_e in σ units (n × n, row-major) */
  veFull: Float64Array;
  covariance: Covariance;
}

function solveCore(p: Problem, confidence: number): Core {
  const n = p.mIds.length;
  const q = p.uIds.length;
  const x = Float64Array.from(p.xm);
  const u = Float64Array.from(p.guess);
  let lin: Linearisation | null = null;
  let iterations = 0;
  let converged = false;
  let lastStep = Infinity;
  let lastRes = Infinity;
  for (let it = 1; it <= p.maxIter; it++) {
    iterations = it;
    lin = linearise(p, x, u);
    // At the round-off floor the residual and the steps stop shrinking. Each step is recomputed
    // from the measured values, so that floor grows with the size of the corrections: a gross
    // error of 1e5 σ leaves steps and residuals of ~1e-9 σ, above the 1e-10 tolerance, though the
    // solution is as exact as double precision makes it. Where they stall below FLOOR_FACTOR·ε
    // of the largest correction (σ units), the solution is taken as converged.
    let maxCorr = 0;
    for (let i = 0; i < n; i++) maxCorr = Math.max(maxCorr, Math.abs(x[i] - p.xm[i]) / p.sig[i]);
    const floor = FLOOR_FACTOR * EPS * maxCorr;
    const resStalled = it > 1 && lin.maxRes <= floor && lin.maxRes >= 0.5 * lastRes;
    lastRes = lin.maxRes;
    let stepOk = true;
    let maxStep = 0;
    for (let i = 0; i < n; i++) {
      const d = Math.abs(lin.dxi[i]);
      maxStep = Math.max(maxStep, d);
      if (d > p.tol && d * p.sig[i] > ROUNDOFF * Math.abs(x[i])) stepOk = false;
      x[i] += lin.dxi[i] * p.sig[i];
    }
    for (let j = 0; j < q; j++) {
      if (lin.observableU[j]) {
        const d = Math.abs(lin.du[j]) * lin.cn[j];
        maxStep = Math.max(maxStep, d);
        if (d > p.tol && Math.abs(lin.du[j]) > ROUNDOFF * Math.abs(u[j])) stepOk = false;
      }
      u[j] += lin.du[j];
    }
    const stepStalled = it > 1 && maxStep <= floor && maxStep >= 0.5 * lastStep;
    lastStep = maxStep;
    if ((stepOk || stepStalled) && (lin.resOk || resStalled)) {
      converged = true;
      break;
    }
  }
  if (!converged || !lin) {
    throw new ReconcileError(
      'NOT_CONVERGED',
      `reconciliation did not converge in ${p.maxIter} iterations (last step ${lastStep.toExponential(3)}, residual ${lin?.maxRes.toExponential(3)} in σ units; tolerance ${p.tol})`,
      { iterations, lastStep, residual: lin?.maxRes },
    );
  }
  const observable: string[] = [];
  const unobservable: string[] = [];
  p.uIds.forEach((id, j) => (lin!.observableU[j] ? observable : unobservable).push(id));
  const redundant = p.mIds.filter((_, i) => lin!.redundantX[i]);
  const dof = lin.dof;
  if (dof === 0) {
    throw new ReconcileError(
      'NOT_REDUNDANT',
      'the measurements are not redundant (dof 0): no correction or test is possible',
      {
        observable,
        unobservable,
      },
    );
  }
  // covariance: V_e = K·M⁻¹·Kᵀ, cov(ξ̂) = C − V_e (scaled)
  // with M = L·Lᵀ: V_e,ii = ‖L⁻¹·K_iᵀ‖²
  const kMat = lin.k!;
  const lFactor = Float64Array.from(lin.cholM!.lowerTriangularMatrix.to1DArray());
  const wk = lowerSolve(lFactor, Float64Array.from(kMat.transpose().to1DArray()), dof, n);
  const ve = columnNorms2(wk, dof, n);
  // V_e = Wᵀ·W with W = L⁻¹·Kᵀ (dof × n)
  const veFull = new Float64Array(n * n);
  for (let r = 0; r < dof; r++) {
    const off = r * n;
    for (let i = 0; i < n; i++) {
      const wi = wk[off + i];
      if (wi === 0) continue;
      for (let j = i; j < n; j++) veFull[i * n + j] += wi * wk[off + j];
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) veFull[i * n + j] = veFull[j * n + i];
  const values: Record<string, number> = {};
  const sigmas: Record<string, number> = {};
  const corrections: Record<string, number> = {};
  const z: Record<string, number | null> = {};
  const zByIndex: (number | null)[] = [];
  const e = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const id = p.mIds[i];
    values[id] = x[i];
    corrections[id] = x[i] - p.xm[i];
    e[i] = (x[i] - p.xm[i]) / p.sig[i];
    sigmas[id] = p.sig[i] * Math.sqrt(Math.max(0, 1 - ve[i]));
    const zi = lin.redundantX[i] && ve[i] > 1e-14 ? Math.abs(e[i]) / Math.sqrt(ve[i]) : null;
    z[id] = zi;
    zByIndex.push(zi);
  }
  // unmeasured observable: Δη'_basic = −R11⁻¹·T1·Δξ  →  L = −R11⁻¹·T1, cov = L·cov(ξ̂)·Lᵀ
  const rB = lin.qrB.rank;
  if (rB > 0 && observable.length > 0) {
    const l = solveR11(lin.qrB, lin.t1, n); // rB × n (sign irrelevant for the covariance)
    const lm = Matrix.from1DArray(rB, n, l);
    const lc = p.corr ? lm.mmul(Matrix.from1DArray(n, n, p.corr)) : lm;
    const lk = lm.mmul(kMat); // rB × dof
    const bDiag = columnNorms2(lowerSolve(lFactor, Float64Array.from(lk.transpose().to1DArray()), dof, rB), dof, rB);
    for (let r = 0; r < rB; r++) {
      const j = lin.qrB.perm[r];
      if (!lin.observableU[j]) continue;
      let a = 0;
      for (let i = 0; i < n; i++) a += lc.get(r, i) * l[r * n + i];
      const b = bDiag[r];
      values[p.uIds[j]] = u[j];
      sigmas[p.uIds[j]] = Math.sqrt(Math.max(0, a - b)) / lin.cn[j];
    }
  }
  // joint covariance: measured P = C − V_e (σ units); observable unmeasured u_j = u_j0 + J_r·Δξ,
  // J_r = −(R11⁻¹·T1)_r / cn_j, so cov(u, ξ̂) = J·P and cov(u, u) = J·P·Jᵀ
  const pSc = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) pSc[i * n + j] = (p.corr ? p.corr[i * n + j] : i === j ? 1 : 0) - veFull[i * n + j];
  const covIds = [...p.mIds];
  const jRows: Float64Array[] = [];
  if (rB > 0 && observable.length > 0) {
    const l = solveR11(lin.qrB, lin.t1, n);
    for (let j = 0; j < q; j++) {
      if (!lin.observableU[j]) continue;
      const r = Array.from(lin.qrB.perm.slice(0, rB)).indexOf(j);
      if (r < 0) continue;
      const row = new Float64Array(n);
      for (let i = 0; i < n; i++) row[i] = -l[r * n + i] / lin.cn[j];
      covIds.push(p.uIds[j]);
      jRows.push(row);
    }
  }
  const dim = covIds.length;
  // rows of the full Jacobian from ξ to SI values: measured i → σ_i·e_i, unmeasured → J_r
  const jp: Float64Array[] = [];
  for (const row of jRows) {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const ri = row[i];
      if (ri === 0) continue;
      for (let k = 0; k < n; k++) out[k] += ri * pSc[i * n + k];
    }
    jp.push(out);
  }
  const matrix = new Array<number>(dim * dim).fill(0);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) matrix[i * dim + j] = p.sig[i] * p.sig[j] * pSc[i * n + j];
  for (let r = 0; r < jRows.length; r++) {
    const a = n + r;
    for (let i = 0; i < n; i++) {
      const c = jp[r][i] * p.sig[i];
      matrix[a * dim + i] = c;
      matrix[i * dim + a] = c;
    }
    for (let t = 0; t <= r; t++) {
      let c = 0;
      for (let k = 0; k < n; k++) c += jp[r][k] * jRows[t][k];
      matrix[a * dim + n + t] = c;
      matrix[(n + t) * dim + a] = c;
    }
  }
  const covariance: Covariance = { ids: covIds, matrix };
  // χ² = eᵀ C⁻¹ e in σ units
  let chiSquare = 0;
  if (p.corrChol) {
    const sol = p.corrChol.solve(Matrix.columnVector(Array.from(e)));
    for (let i = 0; i < n; i++) chiSquare += e[i] * sol.get(i, 0);
  } else {
    for (let i = 0; i < n; i++) chiSquare += e[i] * e[i];
  }
  const critical = jStat.chisquare.inv(confidence, dof);
  for (const [k, val] of Object.entries(values)) {
    if (!Number.isFinite(val) || !Number.isFinite(sigmas[k])) {
      throw new ReconcileError('NOT_FINITE', `result for "${k}" is not finite`, { id: k });
    }
  }
  if (!Number.isFinite(chiSquare) || !Number.isFinite(critical)) {
    throw new ReconcileError('NOT_FINITE', `global test is not finite (χ² ${chiSquare}, critical ${critical})`);
  }
  return {
    p,
    x,
    u,
    iterations,
    lin,
    values,
    sigmas,
    corrections,
    z,
    zByIndex,
    chiSquare,
    dof,
    critical,
    passed: chiSquare <= critical,
    redundant,
    observable,
    unobservable,
    veFull,
    covariance,
  };
}

function constraintTests(p: Problem, core: Core): Record<string, number> {
  const n = p.mIds.length;
  const sys = evaluate(p, p.xm, core.u);
  const out: Record<string, number> = {};
  p.constraints.forEach((c, k) => {
    if (sys.readsUnmeasured[k]) return;
    const row = new Float64Array(n);
    for (let i = 0; i < n; i++) row[i] = sys.a[k * n + i] * p.sig[i];
    let s = 0;
    if (p.corr) {
      for (let i = 0; i < n; i++) {
        if (row[i] === 0) continue;
        for (let j = 0; j < n; j++) s += row[i] * p.corr[i * n + j] * row[j];
      }
    } else {
      for (let i = 0; i < n; i++) s += row[i] * row[i];
    }
    if (s > 0) out[c.id] = Math.abs(sys.f[k]) / Math.sqrt(s);
  });
  return out;
}

/** Correlation of a and b in a covariance (null where either is absent or has no variance). */
export function correlationIn(cov: Covariance, a: string, b: string): number | null {
  const i = cov.ids.indexOf(a);
  const j = cov.ids.indexOf(b);
  const n = cov.ids.length;
  if (i < 0 || j < 0) return null;
  const d = Math.sqrt(cov.matrix[i * n + i] * cov.matrix[j * n + j]);
  return d > 0 ? cov.matrix[i * n + j] / d : null;
}

function correlationOf(ve: Float64Array, n: number, i: number, j: number): number {
  const d = Math.sqrt(ve[i * n + i] * ve[j * n + j]);
  return d > 0 ? ve[i * n + j] / d : 0;
}

/** The measurement at index i and the redundant ones whose corrections correlate with its by |ρ| ≥ GROUP_CORRELATION. */
function groupOf(core: Core, i: number): string[] {
  const n = core.p.mIds.length;
  const out = [core.p.mIds[i]];
  for (let j = 0; j < n; j++) {
    if (j === i || core.zByIndex[j] === null) continue;
    if (Math.abs(correlationOf(core.veFull, n, i, j)) >= GROUP_CORRELATION) out.push(core.p.mIds[j]);
  }
  return out;
}

/** Weighted least-squares reconciliation with global, per-measurement and per-constraint tests and serial elimination. */
export function reconcile(input: ReconcileInput): ReconcileResult {
  const v = validate(input);
  const confidence = v.confidence;
  const zCritical = jStat.normal.inv(1 - (1 - confidence) / 2, 0, 1);
  const p0 = buildProblem(v, new Map());
  const main = solveCore(p0, confidence);
  const tests = constraintTests(p0, main);

  const suspects: string[] = [];
  const removed = new Map<string, number>();
  let current = main;
  let eliminationError: ReconcileResult['eliminationError'];
  const suspectGroups: string[][] = [];
  /** each suspect's signed test value when it was eliminated: −correction/σ(correction) */
  const eliminatedU: Record<string, number> = {};
  while (!current.passed && current.dof >= 2) {
    const cp = current.p;
    let best = -1;
    for (let i = 0; i < cp.mIds.length; i++) {
      const zi = current.zByIndex[i];
      if (zi === null) continue;
      if (best < 0) {
        best = i;
        continue;
      }
      const zb = current.zByIndex[best]!;
      const tie = Math.abs(zi - zb) <= 1e-9 * Math.max(zi, zb);
      const ei = Math.abs(current.corrections[cp.mIds[i]]) / cp.sig[i];
      const eb = Math.abs(current.corrections[cp.mIds[best]]) / cp.sig[best];
      if ((!tie && zi > zb) || (tie && ei > eb)) best = i;
    }
    if (best < 0 || !(current.zByIndex[best]! > zCritical)) break;
    const id = cp.mIds[best];
    suspects.push(id);
    suspectGroups.push(groupOf(current, best));
    eliminatedU[id] = (current.corrections[id] > 0 ? -1 : 1) * current.zByIndex[best]!;
    removed.set(id, current.values[id]);
    try {
      current = solveCore(buildProblem(v, removed), confidence);
    } catch (e) {
      if (!(e instanceof ReconcileError)) throw e;
      eliminationError = { code: e.code, message: e.message };
      suspects.pop();
      suspectGroups.pop();
      removed.delete(id);
      break;
    }
  }
  const nMain = main.p.mIds.length;
  const veSi = new Array<number>(nMain * nMain);
  for (let i = 0; i < nMain; i++)
    for (let j = 0; j < nMain; j++) veSi[i * nMain + j] = main.p.sig[i] * main.p.sig[j] * main.veFull[i * nMain + j];
  const result: ReconcileResult = {
    values: main.values,
    sigmas: main.sigmas,
    corrections: main.corrections,
    z: main.z,
    zCritical,
    chiSquare: main.chiSquare,
    dof: main.dof,
    critical: main.critical,
    passed: main.passed,
    constraintTests: tests,
    suspects,
    suspectGroups,
    eliminatedU,
    correctionCovariance: { ids: [...main.p.mIds], matrix: veSi },
    covariance: main.covariance,
    final: {
      values: current.values,
      sigmas: current.sigmas,
      corrections: current.corrections,
      z: current.z,
      chiSquare: current.chiSquare,
      dof: current.dof,
      critical: current.critical,
      passed: current.passed,
    },
    iterations: main.iterations,
    redundant: main.redundant,
    observable: main.observable,
    unobservable: main.unobservable,
  };
  if (eliminationError) result.eliminationError = eliminationError;
  return result;
}
