/**
 * Stage 4, balances: mass, energy, duty and power rows of every piece of equipment, on the readings
 * (flows nobody reads from the reconciliation) and on the reconciled values; each row's test value
 * and σ from the reconciliation's covariance of the corrections (the reconciled flows in a row are
 * not independent readings).
 */
import { type BalanceSpec } from '../equations';
import type { BalanceRow, BalanceValues, EquipmentBalance } from '../types';
import { fin, type PState } from './base';
import type { StatesCtx } from './states';

/** Every balance of the model on the readings and on the reconciled values. */
export function balancesStage(c: StatesCtx) {
  const { model, eq, res, measuredOf, getRec, getMixed, recPower } = c;
  // every balance of the model is reported (those one stream or one enthalpy makes hold by construction too)
  const activeSpecs = eq.balances.filter((s) => s.kind !== 'power' || s.tags.length > 0);
  const rowValues = (spec: BalanceSpec, get: (id: string) => PState): { v: BalanceValues; sigma: number } | null => {
    const sq = (x: number) => x * x;
    const mk = (i: number, o: number): BalanceValues => {
      const den = Math.max(Math.abs(i), Math.abs(o));
      return { in: i, out: o, residual: i - o, relative: den > 0 ? (i - o) / den : null };
    };
    if (spec.kind === 'mass') {
      let i = 0;
      let o = 0;
      let s2 = 0;
      for (const p of spec.ins) {
        const st = get(p);
        if (!fin(st.m)) return null;
        i += st.m;
        s2 += sq(st.sm ?? 0);
      }
      for (const p of spec.outs) {
        const st = get(p);
        if (!fin(st.m)) return null;
        o += st.m;
        s2 += sq(st.sm ?? 0);
      }
      return { v: mk(i, o), sigma: Math.sqrt(s2) };
    }
    if (spec.kind === 'enthalpy') {
      const a = get(spec.from);
      const c = get(spec.to);
      if (!fin(a.h) || !fin(c.h)) return null;
      return { v: mk(a.h, c.h), sigma: Math.sqrt(sq(a.sh ?? 0) + sq(c.sh ?? 0)) };
    }
    const flowSum = (pts: string[]) => {
      let s = 0;
      let s2 = 0;
      for (const p of pts) {
        const st = get(p);
        if (!fin(st.m) || !fin(st.h)) return null;
        s += st.m * st.h;
        s2 += sq(st.h * (st.sm ?? 0)) + sq(st.m * (st.sh ?? 0));
      }
      return { s, s2 };
    };
    if (spec.kind === 'energy') {
      const i = flowSum(spec.ins);
      const o = flowSum(spec.outs);
      if (!i || !o) return null;
      return { v: mk(i.s, o.s), sigma: Math.sqrt(i.s2 + o.s2) };
    }
    if (spec.kind === 'duty') {
      const i = flowSum(spec.ins);
      const o = flowSum(spec.outs);
      const ci = get(spec.coolingIn!);
      const co = get(spec.coolingOut!);
      const mcw = fin(ci.m) ? ci.m : co.m;
      const smcw = fin(ci.m) ? ci.sm : co.sm;
      if (!i || !o || !fin(mcw) || !fin(ci.h) || !fin(co.h)) return null;
      const dh = co.h - ci.h;
      const s2 = i.s2 + o.s2 + sq(dh * (smcw ?? 0)) + sq(mcw * (ci.sh ?? 0)) + sq(mcw * (co.sh ?? 0));
      return { v: mk(i.s - o.s, mcw * dh), sigma: Math.sqrt(s2) };
    }
    if (spec.kind !== 'power') return null;
    let work = 0;
    let s2 = 0;
    for (const sec of spec.sections) {
      const i = flowSum(sec.ins);
      const o = flowSum(sec.outs);
      if (!i || !o) return null;
      work += i.s - o.s;
      s2 += i.s2 + o.s2;
    }
    const pMeasured = get === getRec ? recPower(spec.equipmentId) : measuredOf(spec.tags);
    const pv = typeof pMeasured === 'number' ? pMeasured : pMeasured?.v;
    if (!fin(pv)) return null;
    const sP = get === getRec ? 0 : (measuredOf(spec.tags)?.s ?? 0);
    return { v: mk(spec.efficiency * work, pv), sigma: Math.sqrt(spec.efficiency ** 2 * s2 + sP * sP) };
  };
  // the test value of each balance from the reconciliation's covariance: with the readings put back
  // into its constraint (unmeasured parts at their reconciled values), the residual is −∇f·e to
  // first order, e the corrections, so var(r) = ∇fᵀ·V_e·∇f (VDI 2048-1; V_e = res.correctionCovariance)
  const measuredValue = new Map(eq.measured.map((m) => [m.id, m.value]));
  const testOf = (id: string): number | null => {
    const con = eq.constraints.find((x) => x.id === id);
    const ci = eq.info[id];
    if (!res || !con || !ci) return null;
    const at: Record<string, number> = { ...res.values };
    const deps = ci.deps.filter((d) => d in at || measuredValue.has(d));
    if (deps.length !== ci.deps.length) return null;
    const mixed: Record<string, number> = { ...at };
    for (const d of deps) if (measuredValue.has(d) && d in res.values) mixed[d] = measuredValue.get(d)!;
    let r: number;
    const g: Record<string, number> = {};
    try {
      r = con.f(mixed);
      if (con.grad) Object.assign(g, con.grad(at));
      else {
        for (const d of deps) {
          if (!measuredValue.has(d)) continue;
          const h = 1e-6 * Math.max(Math.abs(at[d]), 1e-6);
          const up = { ...at, [d]: at[d] + h };
          const dn = { ...at, [d]: at[d] - h };
          g[d] = (con.f(up) - con.f(dn)) / (2 * h);
        }
      }
    } catch {
      return null;
    }
    const cov = res.correctionCovariance;
    const n = cov.ids.length;
    const idx = cov.ids.map((x, k) => [x, k] as const).filter(([x]) => fin(g[x]) && g[x] !== 0);
    let v = 0;
    for (const [x, i] of idx) for (const [y, j] of idx) v += g[x] * g[y] * cov.matrix[i * n + j];
    return fin(r) && v > 0 ? Math.abs(r) / Math.sqrt(v) : null;
  };
  const rowsBySpec = new Map<string, BalanceRow>();
  for (const spec of activeSpecs) {
    const m = rowValues(spec, getMixed);
    const r = res ? rowValues(spec, getRec) : null;
    const test = spec.id in eq.info ? testOf(spec.id) : null;
    // the row's σ in its own unit from that test value (residual / test value) where both are formed
    const sigmaFromTest =
      m && test !== null && test > 1e-9 && Math.abs(m.v.residual) > 0 ? Math.abs(m.v.residual) / test : null;
    rowsBySpec.set(spec.id, {
      id: spec.id,
      kind: spec.kind,
      label: spec.label,
      unit: spec.kind === 'mass' ? 'kg/s' : spec.kind === 'enthalpy' ? 'J/kg' : 'W',
      measured: m ? m.v : null,
      reconciled: r ? r.v : null,
      measuredSigma: sigmaFromTest ?? (m && m.sigma > 0 ? m.sigma : null),
      test,
    });
  }
  const balances: EquipmentBalance[] = model.equipment.map((e) => ({
    equipmentId: e.id,
    kind: e.kind,
    label: e.label,
    rows: activeSpecs.filter((s) => s.equipmentId === e.id).map((s) => rowsBySpec.get(s.id)!),
  }));

  return { activeSpecs, rowsBySpec, balances };
}
