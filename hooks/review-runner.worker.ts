/**
 * The round check's Web Worker (web build): takes { id, kind: 'review', input } and answers
 * { id, ok, review | message, ms }; { kind: 'warm' } runs one check of the demo unit at its
 * design point so the engine's code is compiled before the technician's first check.
 */
import { demoDesignReadings, demoUnit } from '@/shared/cycle';
import { reviewRound, type ReviewInput } from '@/shared/review';

interface Scope {
  onmessage: ((e: { data: { id: number; kind: 'review' | 'warm'; input?: ReviewInput } }) => void) | null;
  postMessage(message: unknown): void;
}
const scope = self as unknown as Scope;

function warmInput(): ReviewInput {
  const b = 101_000;
  const t = Date.UTC(2025, 0, 1);
  const readings = demoDesignReadings(b).map((r, i) => ({ id: `warm-${i}`, tag: r.instrumentTag, valueSI: r.valueSI, time: t, order: i }));
  return {
    model: demoUnit,
    round: { id: 'warm', routeId: 'warm', routeName: 'warm-up', stops: [{ name: 'all', tags: readings.map((r) => r.tag) }], startedAt: t, finishedAt: null, status: 'in-progress', barometricPa: b, readings },
    others: [],
    at: t,
  };
}

scope.onmessage = (e) => {
  const { id, kind, input } = e.data;
  const t0 = performance.now();
  try {
    const review = reviewRound(kind === 'warm' ? warmInput() : input!);
    scope.postMessage({ id, ok: true, review: kind === 'warm' ? null : review, ms: performance.now() - t0 });
  } catch (err) {
    scope.postMessage({ id, ok: false, message: err instanceof Error ? err.message : String(err), ms: performance.now() - t0 });
  }
};
