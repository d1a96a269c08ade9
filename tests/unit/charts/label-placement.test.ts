/**
 * Label placement on the T–s chart (shared/charts label-placement, ts-layout). The geometry
 * checks are the test's own arithmetic on boxes; the points are the Fernhallow demo unit at its
 * design point (shared/cycle demoDesignReadings: every balance closes by construction; states from
 * IAPWS-IF97), laid out at the chart sizes of a 390 px phone and a 1280 px screen (the cycle
 * page's card widths). Keeping labels clear of each other and of the marks is common practice
 * for point labels on engineering charts.
 */
import { boxesIntersect, circleInBox, placeLabels, segmentHitsBox, type Box } from '@/shared/charts/label-placement';
import { tsFigure, turbineSections } from '@/shared/charts/ts-figure';
import { TS_MARK_R, tsLabels, tsScales } from '@/shared/charts/ts-layout';
import { project, saturationDome } from '@/shared/charts/ts-diagram';
import { analyseRound } from '@/shared/cycle';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { barometricFromElevation } from '@/shared/units';

const baro = barometricFromElevation(112);
const design = analyseRound(demoUnit, demoDesignReadings(baro), { barometricPa: baro });
const fig = tsFigure(design.statePoints, turbineSections(demoUnit));
const dome = saturationDome(60);

/** chart sizes of the cycle page: width of the card's content, height min(520, max(300, 0.7 w)) */
const SIZES = [326, 600, 940].map((w) => [w, Math.min(520, Math.max(300, w * 0.7))] as const);

describe.each(SIZES)('demo design point at %i × %i px', (width, height) => {
  const labels = tsLabels(fig.points, fig.lines, dome, width, height);
  const { xs, ys } = tsScales(fig.points, width, height);

  test('every reconciled state point of the cycle gets a label', () => {
    const reconciled = fig.points.filter((p) => p.kind === 'reconciled').map((p) => p.id);
    expect(reconciled.length).toBeGreaterThan(10);
    expect(labels.map((l) => l.id).sort()).toEqual([...reconciled].sort());
    expect(labels.every((l) => l.placed)).toBe(true);
  });

  test('no two label boxes intersect', () => {
    for (let i = 0; i < labels.length; i++) {
      for (let j = i + 1; j < labels.length; j++) {
        if (boxesIntersect(labels[i].box, labels[j].box))
          throw new Error(
            `${labels[i].id} and ${labels[j].id} overlap: ${JSON.stringify([labels[i].box, labels[j].box])}`,
          );
      }
    }
  });

  test('no label covers a point mark, and a moved label has a leader line to its point', () => {
    for (const l of labels) {
      for (const p of fig.points) {
        const mark = { x: project(p.s, xs), y: project(p.T, ys), r: TS_MARK_R[p.kind] };
        expect(circleInBox(mark, l.box)).toBe(false);
      }
      if (l.leader) expect(Math.hypot(l.leader.x2 - l.leader.x1, l.leader.y2 - l.leader.y1)).toBeGreaterThan(0);
    }
  });
});

test('a crowd of labels on one spot spreads out without overlaps, nearest first, with leaders', () => {
  const bounds: Box = { x: 0, y: 0, w: 400, h: 300 };
  const req = Array.from({ length: 12 }, (_, i) => ({ id: `p${i}`, x: 200, y: 150, w: 40, h: 14, r: 4 }));
  const out = placeLabels(req, { bounds });
  expect(out.every((l) => l.placed)).toBe(true);
  for (let i = 0; i < out.length; i++)
    for (let j = i + 1; j < out.length; j++) expect(boxesIntersect(out[i].box, out[j].box)).toBe(false);
  // the first label sits at the upper right, 3 px beyond the mark (r 4 + gap 3), with no leader
  expect(out[0].box).toEqual({ x: 207, y: 129, w: 40, h: 14 });
  expect(out[0].leader).toBeNull();
  expect(out.some((l) => l.leader !== null)).toBe(true);
});

test('a label keeps off a line when a clean spot is as near, and stays inside the plot', () => {
  // a horizontal line just above the point: the upper positions cross it
  const out = placeLabels([{ id: 'a', x: 100, y: 100, w: 30, h: 12, r: 3 }], {
    bounds: { x: 0, y: 0, w: 300, h: 200 },
    segments: [{ x1: 0, y1: 95, x2: 300, y2: 95 }],
  });
  expect(segmentHitsBox({ x1: 0, y1: 95, x2: 300, y2: 95 }, out[0].box)).toBe(false);
  // near the right edge the label goes left
  const edge = placeLabels([{ id: 'b', x: 295, y: 100, w: 30, h: 12, r: 3 }], {
    bounds: { x: 0, y: 0, w: 300, h: 200 },
  });
  expect(edge[0].box.x + edge[0].box.w).toBeLessThanOrEqual(300);
  expect(edge[0].box.x).toBeLessThan(295);
});

test('no room: the label is left out rather than drawn over another; bad sizes name the label', () => {
  const out = placeLabels(
    [
      { id: 'a', x: 20, y: 10, w: 30, h: 12 },
      { id: 'b', x: 20, y: 10, w: 30, h: 12 },
    ],
    { bounds: { x: 0, y: 0, w: 60, h: 20 }, rings: 0 },
  );
  expect(out[0].placed).toBe(true);
  expect(out[1].placed).toBe(false);
  expect(() =>
    placeLabels([{ id: 'c', x: Number.NaN, y: 0, w: 10, h: 10 }], { bounds: { x: 0, y: 0, w: 10, h: 10 } }),
  ).toThrow('label c: x must be a finite number of px, got NaN');
  expect(() => placeLabels([{ id: 'd', x: 0, y: 0, w: 0, h: 10 }], { bounds: { x: 0, y: 0, w: 10, h: 10 } })).toThrow(
    'label d: w and h must be positive px, got 0 × 10',
  );
});

test('box and segment geometry: touching edges do not intersect; a segment through a box hits it, one beside it does not', () => {
  expect(boxesIntersect({ x: 0, y: 0, w: 10, h: 10 }, { x: 10, y: 0, w: 10, h: 10 })).toBe(false);
  expect(boxesIntersect({ x: 0, y: 0, w: 10, h: 10 }, { x: 9, y: 9, w: 10, h: 10 })).toBe(true);
  expect(segmentHitsBox({ x1: -5, y1: 5, x2: 15, y2: 5 }, { x: 0, y: 0, w: 10, h: 10 })).toBe(true);
  expect(segmentHitsBox({ x1: -5, y1: -5, x2: 15, y2: -1 }, { x: 0, y: 0, w: 10, h: 10 })).toBe(false);
  expect(circleInBox({ x: 15, y: 5, r: 4 }, { x: 0, y: 0, w: 10, h: 10 })).toBe(false);
  expect(circleInBox({ x: 13, y: 5, r: 4 }, { x: 0, y: 0, w: 10, h: 10 })).toBe(true);
});
