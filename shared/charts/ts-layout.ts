/**
 * The geometry of the T–s chart in pixels: its scales (entropy across, temperature up, with room
 * above the hottest point and right of the widest), and where each point's label goes
 * (label-placement.ts: no label over another, over a mark or outside the plot; few over the dome
 * or the cycle's lines). Pure; components/ts-chart.tsx draws what this returns.
 */
import { placeLabels, labelWidth, type Mark, type PlacedLabel, type Segment } from './label-placement';
import { project, type DomePoint, type Scale } from './ts-diagram';

export interface TsPoint {
  id: string;
  label: string;
  /** K */
  T: number;
  /** J/(kg·K) */
  s: number;
  kind: 'measured' | 'reconciled' | 'isentropic';
  /** a measured point whose readings came (in part) from other rounds of the unit */
  borrowed?: boolean;
}

export interface TsLine {
  from: string;
  to: string;
  /** An expansion drawn dashed to its isentropic end point. */
  dashed?: boolean;
}

export const TS_PAD = { left: 52, right: 16, top: 16, bottom: 40 };
export const TS_LABEL_FONT = 11;
/** radius of each kind's mark, px (stroke included) */
export const TS_MARK_R: Record<TsPoint['kind'], number> = { measured: 7, reconciled: 5, isentropic: 6 };

export function tsScales(points: Pick<TsPoint, 'T' | 's'>[], width: number, height: number): { xs: Scale; ys: Scale } {
  const sMax = Math.max(9000, ...points.map((p) => p.s + 300));
  const tMax = Math.max(673.15, ...points.map((p) => p.T + 25));
  return {
    xs: { min: 0, max: sMax, from: TS_PAD.left, to: width - TS_PAD.right },
    ys: { min: 273.15, max: tMax, from: height - TS_PAD.bottom, to: TS_PAD.top },
  };
}

/** The labels of the reconciled points (one per state point), placed. */
export function tsLabels(
  points: TsPoint[],
  lines: TsLine[],
  dome: DomePoint[],
  width: number,
  height: number,
): PlacedLabel[] {
  const { xs, ys } = tsScales(points, width, height);
  const X = (s: number) => project(s, xs);
  const Y = (T: number) => project(T, ys);
  const marks: Mark[] = points.map((p) => ({ x: X(p.s), y: Y(p.T), r: TS_MARK_R[p.kind] }));
  const segments: Segment[] = [];
  for (let i = 1; i < dome.length; i++)
    segments.push({ x1: X(dome[i - 1].s), y1: Y(dome[i - 1].T), x2: X(dome[i].s), y2: Y(dome[i].T) });
  const byId = new Map(points.map((p) => [p.id, p]));
  for (const l of lines) {
    const a = byId.get(l.from);
    const b = byId.get(l.to);
    if (a && b) segments.push({ x1: X(a.s), y1: Y(a.T), x2: X(b.s), y2: Y(b.T) });
  }
  const labelled = points.filter((p) => p.kind === 'reconciled');
  // hottest first: the top of the chart is the most crowded (main steam, reheat, HP exhaust)
  const order = [...labelled].sort((a, b) => b.T - a.T || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  return placeLabels(
    order.map((p) => ({
      id: p.id,
      x: X(p.s),
      y: Y(p.T),
      w: labelWidth(p.label, TS_LABEL_FONT),
      h: TS_LABEL_FONT + 3,
      r: TS_MARK_R[p.kind],
    })),
    {
      bounds: {
        x: TS_PAD.left + 1,
        y: TS_PAD.top - 12,
        w: width - TS_PAD.right - TS_PAD.left,
        h: height - TS_PAD.bottom - TS_PAD.top + 12,
      },
      segments,
      marks,
    },
  );
}
