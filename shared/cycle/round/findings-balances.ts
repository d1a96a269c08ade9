/** Findings on balances that do not close (only when the round fails its global test); a suspect that explains one is named in it. */
import { showSI } from '../format';
import { messages } from '../messages';
import { NOTE, severityForCriticality } from '../severity';
import type { FindingsCtx } from './context';

/** Balances that do not close when the round fails its global test. */
export function balanceFindings(c: FindingsCtx) {
  const { k, eqById, add, eq, res, activeSpecs, rowsBySpec } = c;
  // balances that do not close: only when the round as a whole fails its test; where a suspect
  // explains it the finding says so (a note: server/work-orders/from-findings.ts folds it into the
  // suspect's order as evidence), else it is the equipment's own finding
  // (balances that hold by construction — one stream, one enthalpy — only repeat what the gross-error test says)
  if (res && !res.passed) {
    for (const spec of activeSpecs) {
      if (!(spec.id in eq.info)) continue;
      const row = rowsBySpec.get(spec.id)!;
      if (!row.measured || !row.measuredSigma || spec.kind === 'enthalpy') continue;
      const zr = Math.abs(row.measured.residual) / row.measuredSigma;
      if (zr <= k) continue;
      const e = eqById.get(spec.equipmentId)!;
      const unit = row.unit === 'kg/s' ? 'kg/s' : 'W';
      const what =
        spec.kind === 'mass'
          ? 'mass balance'
          : spec.kind === 'power'
            ? 'turbine work against generator output'
            : spec.kind === 'duty'
              ? 'steam-side heat against cooling water'
              : 'energy balance';
      const rel = row.measured.relative;
      add(
        'balance-not-closed',
        res.suspects.length ? NOTE : severityForCriticality(e.criticality),
        [],
        messages.balanceNotClosed(
          e.label,
          what,
          showSI(row.measured.in, unit),
          showSI(row.measured.out, unit),
          rel === null ? '' : ` (${(Math.abs(rel) * 100).toFixed(1)} % apart)`,
          showSI(k * row.measuredSigma, unit),
          k,
          res.suspects,
        ),
        {
          in: row.measured.in,
          out: row.measured.out,
          residual: row.measured.residual,
          sigma: row.measuredSigma,
          coverage: k,
          kind: spec.kind,
          explainedBy: [...res.suspects],
        },
        { equipmentId: e.id },
      );
    }
  }
}
