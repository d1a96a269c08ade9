/**
 * What the T–s chart of a round's cycle shows, from its stored state points: measured (m-) and
 * reconciled (r-) points of the cycle circuit, and each turbine section's isentropic end points
 * (s-: IAPWS-IF97 ps(p_out, s_in)) with the expansion lines. Pure.
 */
import type { StatePointResult } from '../cycle/types';
import { ps } from '../steam';
import type { TsLine, TsPoint } from './ts-layout';

export interface Section {
  id: string;
  label: string;
  inlet: string;
  outlets: string[];
}

/** Turbine sections of a stored cycle model (loosely read: the model is the unit's, as stored). */
export function turbineSections(model: unknown): Section[] {
  const eq = (model as { equipment?: unknown[] } | null)?.equipment;
  if (!Array.isArray(eq)) return [];
  return eq.flatMap((e) => {
    const x = e as {
      id?: string;
      kind?: string;
      label?: string;
      ports?: { inlet?: string; outlet?: string; extractions?: string[] };
    };
    if (x.kind !== 'turbine-section' || !x.id || !x.ports?.inlet || !x.ports.outlet) return [];
    return [
      {
        id: x.id,
        label: x.label ?? x.id,
        inlet: x.ports.inlet,
        outlets: [...(x.ports.extractions ?? []), x.ports.outlet],
      },
    ];
  });
}

/** The points and lines of the T–s chart: measured (m-), reconciled (r-) and isentropic ends (s-); `borrowedPoints`: state points read (in part) on other rounds. */
export function tsFigure(
  statePoints: StatePointResult[],
  sections: Section[],
  borrowedPoints: ReadonlySet<string> = new Set(),
): { points: TsPoint[]; lines: TsLine[] } {
  const points: TsPoint[] = [];
  const cycle = statePoints.filter((p) => p.circuit === 'cycle');
  for (const p of cycle) {
    if (p.measured.T !== null && p.measured.s !== null)
      points.push({
        id: `m-${p.id}`,
        label: p.id,
        T: p.measured.T,
        s: p.measured.s,
        kind: 'measured',
        ...(borrowedPoints.has(p.id) ? { borrowed: true } : {}),
      });
    if (p.reconciled.T !== null && p.reconciled.s !== null)
      points.push({ id: `r-${p.id}`, label: p.id, T: p.reconciled.T, s: p.reconciled.s, kind: 'reconciled' });
  }
  const byId = Object.fromEntries(cycle.map((p) => [p.id, p]));
  const lines: TsLine[] = [];
  for (const sec of sections) {
    const inl = byId[sec.inlet]?.reconciled;
    if (!inl || inl.s === null || inl.T === null) continue;
    for (const out of sec.outlets) {
      const o = byId[out]?.reconciled;
      if (!o || o.p === null) continue;
      try {
        const end = ps(o.p, inl.s);
        const id = `s-${sec.id}-${out}`;
        points.push({ id, label: `${out}s`, T: end.T, s: end.s, kind: 'isentropic' });
        lines.push({ from: `r-${sec.inlet}`, to: id, dashed: true });
        if (o.T !== null && o.s !== null) lines.push({ from: `r-${sec.inlet}`, to: `r-${out}` });
      } catch {
        // outside IF97: no isentropic end drawn for this outlet
      }
    }
  }
  return { points, lines };
}
