/**
 * A round's cycle: the state points (measured and reconciled), the cycle on the T–s chart with
 * the saturation dome and each turbine section's isentropic end point (IAPWS-IF97 ps(p_out, s_in)),
 * the balances with their residuals, and the performance figures.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import { Card } from '@/components/card';
import { DataTable, type Column } from '@/components/data-table';
import { SeverityMark } from '@/components/severity-mark';
import { ThemedText } from '@/components/themed-text';
import { TsChart, type TsLine, type TsPoint } from '@/components/ts-chart';
import { markOfFinding } from '@/components/work-order-evidence';
import { space } from '@/constants/theme';
import { useRoundAnalysis } from '@/hooks/queries/analysis';
import { useSiteReference } from '@/hooks/queries/instruments';
import type { RoundAnalysisResponse } from '@/shared/api/analysis';
import type { BalanceRow, PerformanceFigure, StatePointResult } from '@/shared/cycle/types';
import { ps } from '@/shared/steam';

interface Section {
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
    const x = e as { id?: string; kind?: string; label?: string; ports?: { inlet?: string; outlet?: string; extractions?: string[] } };
    if (x.kind !== 'turbine-section' || !x.id || !x.ports?.inlet || !x.ports.outlet) return [];
    return [{ id: x.id, label: x.label ?? x.id, inlet: x.ports.inlet, outlets: [...(x.ports.extractions ?? []), x.ports.outlet] }];
  });
}

/** The points and lines of the T–s chart: measured (m-), reconciled (r-) and isentropic ends (s-). */
export function tsFigure(statePoints: StatePointResult[], sections: Section[]): { points: TsPoint[]; lines: TsLine[] } {
  const points: TsPoint[] = [];
  const cycle = statePoints.filter((p) => p.circuit === 'cycle');
  for (const p of cycle) {
    if (p.measured.T !== null && p.measured.s !== null) points.push({ id: `m-${p.id}`, label: p.id, T: p.measured.T, s: p.measured.s, kind: 'measured' });
    if (p.reconciled.T !== null && p.reconciled.s !== null) points.push({ id: `r-${p.id}`, label: p.id, T: p.reconciled.T, s: p.reconciled.s, kind: 'reconciled' });
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

/** toFixed without a "-0.00". */
const fixed = (x: number, d: number) => (Math.abs(x) < 0.5 * 10 ** -d ? (0).toFixed(d) : x.toFixed(d));

const f = (x: number | null, d: number, scale = 1, off = 0) => (x === null ? '—' : fixed(x * scale + off, d));

const pointColumns: Column<StatePointResult>[] = [
  { key: 'id', label: 'Point', flex: 2.4, render: (p) => <ThemedText variant="label"><ThemedText variant="label" bold>{p.id}</ThemedText>{` ${p.label}`}</ThemedText> },
  { key: 'pm', label: 'p read, bar', flex: 1, numeric: true, render: (p) => f(p.measured.p, 3, 1e-5) },
  { key: 'pr', label: 'p balanced, bar', flex: 1, numeric: true, render: (p) => f(p.reconciled.p, 3, 1e-5) },
  { key: 'Tm', label: 'T read, °C', flex: 1, numeric: true, render: (p) => f(p.measured.T, 1, 1, -273.15) },
  { key: 'Tr', label: 'T balanced, °C', flex: 1, numeric: true, render: (p) => f(p.reconciled.T, 1, 1, -273.15) },
  { key: 'h', label: 'h, kJ/kg', flex: 1, numeric: true, render: (p) => f(p.reconciled.h, 1, 1e-3) },
  { key: 's', label: 's, kJ/(kg·K)', flex: 1, numeric: true, render: (p) => f(p.reconciled.s, 4, 1e-3) },
  { key: 'x', label: 'x', flex: 0.7, numeric: true, render: (p) => f(p.reconciled.x, 3) },
  { key: 'm', label: 'ṁ, t/h', flex: 0.9, numeric: true, render: (p) => f(p.reconciled.m, 2, 3.6) },
];

function showBalance(r: BalanceRow, v: number | null): string {
  if (v === null) return '—';
  return r.unit === 'W' ? `${fixed(v / 1e3, 1)} kW` : r.unit === 'kg/s' ? `${fixed(v * 3.6, 3)} t/h` : `${fixed(v / 1e3, 2)} kJ/kg`;
}

function showFigure(p: PerformanceFigure, v: number | null): string {
  if (v === null) return '—';
  if (p.unit === '1') return `${(v * 100).toFixed(1)} %`;
  if (p.unit === 'K') return `${v.toFixed(2)} K`;
  if (p.unit === 'W') return `${(v / 1e6).toFixed(3)} MW`;
  return `${v.toFixed(0)} kJ/kWh`;
}

interface BalanceLine {
  key: string;
  equipment: string;
  row: BalanceRow;
}

const balanceColumns: Column<BalanceLine>[] = [
  { key: 'eq', label: 'Equipment', flex: 1.6, render: (b) => b.equipment },
  { key: 'what', label: 'Balance', flex: 1.8, render: (b) => b.row.label },
  { key: 'meas', label: 'Residual as read', flex: 1.2, numeric: true, render: (b) => showBalance(b.row, b.row.measured?.residual ?? null) },
  { key: 'sig', label: '±σ', flex: 1, numeric: true, render: (b) => showBalance(b.row, b.row.measuredSigma) },
  { key: 'rec', label: 'Residual balanced', flex: 1.2, numeric: true, render: (b) => showBalance(b.row, b.row.reconciled?.residual ?? null) },
];

const figureColumns: Column<PerformanceFigure>[] = [
  { key: 'label', label: 'Figure', flex: 2.5, render: (p) => p.label },
  { key: 'value', label: 'Balanced', flex: 1, numeric: true, render: (p) => showFigure(p, p.value) },
  { key: 'measured', label: 'As read', flex: 1, numeric: true, render: (p) => showFigure(p, p.measured) },
];

function Chart({ a, model }: { a: RoundAnalysisResponse; model: unknown }) {
  const [width, setWidth] = useState(0);
  const fig = useMemo(() => tsFigure(a.statePoints, turbineSections(model)), [a, model]);
  return (
    <View onLayout={(e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width))}>
      {width > 0 ? <TsChart points={fig.points} lines={fig.lines} width={width} height={Math.min(520, Math.max(300, width * 0.7))} /> : null}
    </View>
  );
}

export function CycleScreen({ roundId }: { roundId: string }) {
  const q = useRoundAnalysis(roundId);
  const ref = useSiteReference();
  if (q.error) return <ThemedText tone="danger" testID="cycle-error">{q.error.message}</ThemedText>;
  if (!q.data) return <ThemedText muted>Loading…</ThemedText>;
  const a = q.data;
  const model = ref.data?.units.find((u) => u.id === a.unitId)?.model ?? null;
  const r = a.reconciliation;
  const balances: BalanceLine[] = a.balances.flatMap((b) => b.rows.map((row) => ({ key: `${b.equipmentId}-${row.id}`, equipment: b.label, row })));
  return (
    <View style={styles.stack} testID="cycle-page">
      <ThemedText variant="heading">Cycle of the round</ThemedText>
      <Card testID="cycle-summary">
        <ThemedText variant="label">{`Analysed ${new Date(a.analysedAt).toLocaleString()} · barometer ${(a.barometricPa / 100).toFixed(1)} mbar (${a.barometricSource === 'reading' ? 'read on the round' : 'from the site’s elevation'})`}</ThemedText>
        <ThemedText variant="label" bold testID="cycle-test">
          {r.ok && r.chiSquare !== null && r.critical !== null
            ? `${r.passed ? '✓ The readings agree with the balances' : '◆ The readings do not agree with the balances'}: χ² ${r.chiSquare.toFixed(1)} against ${r.critical.toFixed(1)} allowed (${r.dof} degrees of freedom).`
            : `The balances could not be closed${r.error ? `: ${r.error}` : '.'}`}
        </ThemedText>
        {r.suspects.length ? <ThemedText variant="label" tone="danger">{`◆ Suspect: ${r.suspects.join(', ')}`}</ThemedText> : null}
        {a.modelVersionMismatch ? <ThemedText variant="caption" muted>The phone recorded this round against an older model of the unit.</ThemedText> : null}
      </Card>
      {a.findings.length ? (
        <Card testID="cycle-findings">
          <ThemedText variant="label" bold>Findings</ThemedText>
          {a.findings.map((fd) => (
            <View key={fd.id} style={styles.finding}>
              <SeverityMark severity={markOfFinding(fd.severity)} />
              <ThemedText variant="label" style={styles.grow}>{fd.message}</ThemedText>
            </View>
          ))}
        </Card>
      ) : null}
      <Card>
        <ThemedText variant="label" bold>Temperature–entropy chart</ThemedText>
        <ThemedText variant="caption" muted>Rings: as read. Discs: balanced. Crosses: where each turbine section would end if it expanded without loss (dashed).</ThemedText>
        <Chart a={a} model={model} />
      </Card>
      <ThemedText variant="title">State points</ThemedText>
      <DataTable rows={a.statePoints} columns={pointColumns} rowKey={(p) => p.id} testID="cycle-points" rowTestID={(p) => `cycle-point-${p.id}`} />
      <ThemedText variant="title">Performance</ThemedText>
      <DataTable rows={a.performance} columns={figureColumns} rowKey={(p) => p.id} testID="cycle-figures" rowTestID={(p) => `cycle-figure-${p.id}`} />
      <ThemedText variant="title">Balances</ThemedText>
      <DataTable rows={balances} columns={balanceColumns} rowKey={(b) => b.key} testID="cycle-balances" />
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  finding: { flexDirection: 'row', gap: space.sm, alignItems: 'flex-start' },
  grow: { flex: 1 },
});
