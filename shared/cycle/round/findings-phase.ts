/** Findings on a declared phase (superheated steam, subcooled water) that p and T contradict: not a constraint of the reconciliation. */
import { showDelta, showValue } from '../format';
import { tsatSafe } from '../properties';
import { ATTEND } from '../severity';
import { shownOf, lcFirst } from './base';
import { messages } from '../messages';
import type { FindingsCtx } from './context';

/** A declared phase the readings contradict. */
export function phaseFindings(c: FindingsCtx) {
  const { model, b, k, instByTag, add, accepted, eq, measuredOf } = c;
  for (const pt of model.points) {
    const r = eq.points[pt.id];
    if (!('var' in r.p)) continue;
    const src = eq.vars[r.p.var];
    if (!src?.measured || !src.pointId) continue;
    const pTags = eq.points[src.pointId].tags.p.filter((t) => accepted.has(t));
    const pm = measuredOf(pTags);
    const Tm = measuredOf(r.tags.T);
    if (!pm || !Tm) continue;
    const spread = (tags: string[]) => {
      const xs = tags.filter((t) => accepted.has(t)).map((t) => accepted.get(t)!);
      for (let a = 0; a < xs.length; a++)
        for (let c = a + 1; c < xs.length; c++)
          if (Math.abs(xs[a].value - xs[c].value) > k * Math.hypot(xs[a].sigma, xs[c].sigma)) return true;
      return false;
    };
    if (spread(pTags) || spread(r.tags.T)) continue; // the twin finding speaks first
    const sat = pt.phase === 'saturated-liquid' || pt.phase === 'saturated-vapour' || pt.phase === 'two-phase';
    if (pm.v >= 22.064e6) continue;
    const Ts = tsatSafe(pm.v);
    const dp = Math.max(pm.v * 1e-6, 1e-3);
    const dTs = (tsatSafe(pm.v + dp) - tsatSafe(pm.v - dp)) / (2 * dp);
    const U = k * Math.hypot(Tm.s, dTs * pm.s);
    const dT = Tm.v - Ts;
    const tT = r.tags.T.filter((t) => accepted.has(t));
    const tP = pTags;
    const tempInst = instByTag.get(tT[0])!;
    const pInst = instByTag.get(tP[0])!;
    const sT = shownOf(tempInst);
    const pShown = showValue(shownOf(pInst), pm.v, b, pm.s);
    if (!sat && ((pt.phase === 'vapour' && dT < -U) || (pt.phase === 'liquid' && dT > U))) {
      const vap = pt.phase === 'vapour';
      add(
        'phase-mismatch',
        ATTEND,
        [...tT, ...tP],
        messages.phaseMismatch(
          lcFirst(pt.label),
          vap,
          tT,
          showValue(sT, Tm.v, b, U),
          showDelta(sT, Math.abs(dT), U),
          showValue(sT, Ts, b, U),
          pShown,
        ),
        { T: Tm.v, p: pm.v, tsat: Ts, difference: dT, allowed: U, coverage: k },
        { pointId: pt.id },
      );
    }
  }
}
