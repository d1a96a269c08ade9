/** Findings on values that stay put to the last digit over `stuckRounds` rounds while their neighbours move. */
import { showDelta, showValue } from '../format';
import { portUses, type Equipment, type Instrument } from '../model';
import { ATTEND } from '../severity';
import { fin, shownOf } from './base';
import { messages } from '../messages';
import type { FindingsCtx } from './context';

/** Values stuck over several rounds while their neighbours moved. */
export function stuckFindings(c: FindingsCtx) {
  const { model, opt, b, context, instByTag, eqById, add, placeOf, resolve, accepted } = c;
  const prev = context.previousRounds ?? [];
  if (prev.length >= opt.stuckRounds - 1) {
    const window = prev.slice(prev.length - (opt.stuckRounds - 1));
    const history = window.map((round) => {
      const m = new Map<string, number>();
      for (const r of Array.isArray(round?.readings) ? round.readings : []) {
        const inst = resolve(r);
        if (inst && fin(r.valueSI)) m.set(inst.tag, r.valueSI);
      }
      return m;
    });
    const neighbours = (i: Instrument): string[] => {
      const pts = new Set<string>();
      if (i.point) {
        pts.add(i.point);
        for (const e of model.equipment) {
          const uses = portUses(e);
          if (uses.some((u) => u.point === i.point)) for (const u of uses) pts.add(u.point);
        }
      } else {
        const e = eqById.get(i.equipment!)!;
        const hosts: Equipment[] = e.kind === 'generator' ? e.sections.map((s) => eqById.get(s)!) : [e];
        for (const h of hosts) for (const u of portUses(h)) pts.add(u.point);
      }
      return model.instruments
        .filter(
          (o) => o.tag !== i.tag && ((o.point && pts.has(o.point)) || (o.equipment && o.equipment === i.equipment)),
        )
        .map((o) => o.tag);
    };
    for (const inst of model.instruments) {
      const cur = accepted.get(inst.tag);
      if (!cur) continue;
      const same = history.every(
        (h) => h.has(inst.tag) && Math.abs(h.get(inst.tag)! - cur.value) <= 1e-9 * Math.max(1, Math.abs(cur.value)),
      );
      if (!same) continue;
      const moved: { tag: string; by: number }[] = [];
      for (const n of neighbours(inst)) {
        const nc = accepted.get(n);
        if (!nc || !history.every((h) => h.has(n))) continue;
        const by = Math.max(...history.map((h) => Math.abs(h.get(n)! - nc.value)));
        if (by > nc.sigma) moved.push({ tag: n, by });
      }
      if (moved.length === 0) continue;
      const shown = shownOf(inst);
      const movedText = moved
        .slice(0, 3)
        .map((m) => `${m.tag} by ${showDelta(shownOf(instByTag.get(m.tag)!), m.by, accepted.get(m.tag)!.sigma)}`)
        .join(', ');
      add(
        'stuck-value',
        ATTEND,
        [inst.tag],
        messages.stuck(
          inst.tag,
          showValue(shown, cur.value, b, cur.sigma),
          opt.stuckRounds,
          `${movedText}${moved.length > 3 ? ', …' : ''}`,
        ),
        {
          value: cur.value,
          rounds: opt.stuckRounds,
          neighboursMoved: moved.map((m) => m.tag),
          movedBy: moved.map((m) => m.by),
        },
        placeOf(inst),
      );
    }
  }
}
