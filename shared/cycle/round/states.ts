/**
 * Stage 3, states: each state point from the readings (measured) and from the reconciliation with
 * the suspects removed (reconciled), with their σ.
 */
import { type SteamPhase } from '../../steam';
import { SCALE, type HExpr } from '../equations';
import { propsPT, propsSat, stateFromPH, stateFromPT, stateFromPX, tsatSafe } from '../properties';
import type { PointValues, StatePointResult } from '../types';
import { fin, orNull, combine, EMPTY, type PState, type Combined } from './base';
import type { RecCtx } from './reconciliation';

/** State points from the readings and from the reconciled values. */
export function statesStage(c: RecCtx) {
  const { model, accepted, eq, res, recV, recS } = c;
  /** an enthalpy expression at the final values (J/kg), null where a variable it reads is not determined */
  const evalFinal = (e: HExpr): number | null => {
    if (!res) return null;
    const fv = res.final.values;
    for (const d of e.deps) if (!fin(fv[d])) return null;
    const h = e.value(fv) * SCALE.h;
    return fin(h) ? h : null;
  };
  const measuredOf = (tags: string[]) => combine(tags.filter((t) => accepted.has(t)).map((t) => accepted.get(t)!));
  const recState = new Map<string, PState>();
  const measState = new Map<string, PState>();
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    // reconciled
    {
      const p = 'var' in r.p ? recV(r.p.var) : r.p.value * SCALE.p;
      const sp = 'var' in r.p ? recS(r.p.var) : null;
      let T: number | null = null;
      let sT: number | null = null;
      if (sat) T = fin(p) ? tsatSafe(p) : null;
      else if (r.T && 'var' in r.T) {
        T = recV(r.T.var);
        sT = recS(r.T.var);
      }
      const hx = r.h ?? eq.hGroups[r.hGroup]?.h ?? null;
      let h: number | null = hx ? evalFinal(hx) : null;
      const hv = eq.hGroups[r.hGroup] && !eq.hGroups[r.hGroup].rep ? `h@${r.hGroup}` : null;
      const sh = !r.h && hv ? recS(hv) : null;
      if (h === null && fin(p)) {
        if (pt.phase === 'saturated-liquid') h = propsSat(p).hf;
        else if (pt.phase === 'saturated-vapour') h = propsSat(p).hg;
        else if (!sat && fin(T)) h = stateFromPT(p, T)?.h ?? null;
      }
      const st = fin(p) && fin(h) ? stateFromPH(p, h) : null;
      let x: number | null = r.x ? recV(r.x) : null;
      const sx = r.x ? recS(r.x) : null;
      if (x === null) x = pt.phase === 'saturated-liquid' ? 0 : pt.phase === 'saturated-vapour' ? 1 : (st?.x ?? null);
      if (T === null && st) T = st.T;
      const m = r.m ? recV(r.m) : null;
      const sm = r.m ? recS(r.m) : null;
      recState.set(pt.id, {
        p: orNull(p),
        T: orNull(T),
        h: orNull(h),
        s: orNull(st?.s),
        x: orNull(x),
        m: orNull(m),
        phase: st?.phase ?? null,
        sp: orNull(sp),
        sT: orNull(sT),
        sh: orNull(sh),
        sm: orNull(sm),
        sx: orNull(sx),
      });
    }
  }
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    let pm: Combined | null = null;
    if ('var' in r.p) {
      const src = eq.vars[r.p.var];
      if (src?.measured && src.pointId) pm = measuredOf(eq.points[src.pointId].tags.p);
    } else pm = { v: r.p.value * SCALE.p, s: 0 };
    const Tm = measuredOf(r.tags.T);
    let T = Tm?.v ?? null;
    const sT = Tm?.s ?? null;
    let h: number | null = null;
    let sh: number | null = null;
    let st: ReturnType<typeof stateFromPT> = null;
    if (pm) {
      const dp = Math.max(pm.v * 1e-6, 1e-3);
      if (sat) {
        if (T === null) T = tsatSafe(pm.v);
        if (pt.phase !== 'two-phase') {
          const liq = pt.phase === 'saturated-liquid';
          st = stateFromPX(pm.v, liq ? 0 : 1);
          const d =
            (liq ? propsSat(pm.v + dp).hf - propsSat(pm.v - dp).hf : propsSat(pm.v + dp).hg - propsSat(pm.v - dp).hg) /
            (2 * dp);
          h = st?.h ?? null;
          sh = Math.abs(d) * pm.s;
        }
      } else if (Tm) {
        st = stateFromPT(pm.v, Tm.v);
        h = st?.h ?? null;
        const a = propsPT(pm.v, Tm.v, pt.phase);
        const d = (propsPT(pm.v + dp, Tm.v, pt.phase).h - propsPT(pm.v - dp, Tm.v, pt.phase).h) / (2 * dp);
        sh = Math.sqrt((a.cp * Tm.s) ** 2 + (d * pm.s) ** 2);
      }
    }
    const mm = measuredOf(r.tags.m);
    measState.set(pt.id, {
      p: orNull(pm?.v),
      T: orNull(T),
      h: orNull(h),
      s: orNull(st?.s),
      x: orNull(st?.x ?? (pt.phase === 'saturated-liquid' ? 0 : pt.phase === 'saturated-vapour' ? 1 : null)),
      m: orNull(mm?.v),
      phase: st?.phase ?? null,
      sp: orNull(pm?.s),
      sT: orNull(sT),
      sh: orNull(sh),
      sm: orNull(mm?.s),
      sx: null,
    });
  }
  const getRec = (id: string): PState => recState.get(id) ?? EMPTY;
  const getMeas = (id: string): PState => measState.get(id) ?? EMPTY;
  /** measured where measured, else reconciled (for the balance report) */
  const getMixed = (id: string): PState => {
    const m = getMeas(id);
    const r = getRec(id);
    return {
      ...r,
      m: m.m ?? r.m,
      sm: m.m !== null ? m.sm : r.sm,
      h: m.h ?? r.h,
      sh: m.h !== null ? m.sh : r.sh,
    };
  };
  const powerTags: Record<string, string[]> = {};
  for (const i of model.instruments)
    if (i.quantity === 'power' && accepted.has(i.tag)) (powerTags[i.equipment!] ??= []).push(i.tag);
  const measPower = (gid: string) => measuredOf(powerTags[gid] ?? [])?.v ?? null;
  const recPower = (gid: string) => {
    const t = powerTags[gid];
    return t && t.length ? recV(t[0]) : null;
  };

  const statePoints: StatePointResult[] = model.points.map((pt) => {
    const r = eq.points[pt.id];
    const rec = getRec(pt.id);
    const meas = getMeas(pt.id);
    const vals = (s: PState): PointValues => ({
      p: s.p,
      T: s.T,
      h: s.h,
      s: s.s,
      x: s.x,
      m: s.m,
      phase: (s.phase as SteamPhase | null) ?? null,
    });
    return {
      id: pt.id,
      label: pt.label,
      expectedPhase: pt.phase,
      circuit: pt.circuit ?? 'cycle',
      pressureSource: r.pressureSource,
      ...(r.pressureFrom ? { pressureFrom: r.pressureFrom } : {}),
      measured: vals(meas),
      reconciled: vals(rec),
      sigmas: { p: rec.sp, T: rec.sT, h: rec.sh, x: rec.sx, m: rec.sm },
    };
  });

  return { measuredOf, getRec, getMeas, getMixed, measPower, recPower, statePoints };
}

/** What the analysis knows once the states are rebuilt. */
export type StatesCtx = RecCtx & ReturnType<typeof statesStage>;
