/**
 * A round's cycle: the state points (measured and reconciled), the cycle on the T–s chart with
 * the saturation dome and each turbine section's isentropic end point (IAPWS-IF97 ps(p_out, s_in)),
 * the balances with their residuals, and the performance figures with their 95 % intervals (or the
 * words "not determinable from these instruments" and the readings that carry the variance).
 *
 * The analysis is unit-level: every state point of the unit is shown, also those the round's
 * route does not read, whose readings were borrowed from other rounds of the unit (within ROUND_CHECK_WINDOW_HOURS, 4 h;
 * the analysis' readingOrigins). Those are marked in the table ("Read on") and on the chart
 * (a dashed ring), and the rounds they came from are named with a link to their own cycle.
 */
import { Link } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import { Card } from '@/components/card';
import { DataTable, type Column } from '@/components/data-table';
import { SeverityMark } from '@/components/severity-mark';
import { ThemedText } from '@/components/themed-text';
import { TsChart } from '@/components/ts-chart';
import { markOfFinding } from '@/components/work-order-evidence';
import { space, touchTarget } from '@/constants/theme';
import { useRoundAnalysis } from '@/hooks/queries/analysis';
import { useSiteReference } from '@/hooks/queries/instruments';
import type { ReadingOrigin, RoundAnalysisResponse } from '@/shared/api/analysis';
import type { BalanceRow, PerformanceFigure, StatePointResult } from '@/shared/cycle/types';
import { tsFigure, turbineSections } from '@/shared/charts/ts-figure';
import { ROUND_CHECK_WINDOW_HOURS } from '@/shared/round-check/assemble';

export { tsFigure, turbineSections };

/** toFixed without a "-0.00". */
const fixed = (x: number, d: number) => (Math.abs(x) < 0.5 * 10 ** -d ? (0).toFixed(d) : x.toFixed(d));

const f = (x: number | null, d: number, scale = 1, off = 0) => (x === null ? '—' : fixed(x * scale + off, d));

/** Where a state point's readings came from, said briefly. */
export interface PointOrigin {
  own: number;
  borrowed: ReadingOrigin[];
}

/** The readings of each state point by origin (instruments sitting on the point). */
export function originsByPoint(origins: ReadingOrigin[] | undefined): Map<string, PointOrigin> {
  const out = new Map<string, PointOrigin>();
  for (const o of origins ?? []) {
    if (!o.pointId) continue;
    const e = out.get(o.pointId) ?? { own: 0, borrowed: [] };
    if (o.own) e.own++;
    else e.borrowed.push(o);
    out.set(o.pointId, e);
  }
  return out;
}

const shortTime = (iso: string) =>
  new Date(iso).toLocaleString([], { month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit' });

/** Why a point without a gauge of its own still has values. */
const NO_GAUGE: Record<StatePointResult['pressureSource'], (p: StatePointResult) => string> = {
  'same-as': (p) => `No gauge here (pressure of ${p.pressureFrom ?? 'another point'})`,
  saturation: () => 'No gauge here (saturation)',
  assumed: () => 'No gauge here (design pressure)',
  measured: () => 'No gauge here',
  unmeasured: () => 'No gauge here',
};

export function originWords(o: PointOrigin | undefined, p?: StatePointResult): string {
  if (!o || (o.own === 0 && o.borrowed.length === 0)) return p ? NO_GAUGE[p.pressureSource](p) : 'No gauge here';
  if (o.borrowed.length === 0) return 'This round';
  const rounds = [...new Map(o.borrowed.map((b) => [b.roundId ?? '?', b])).values()];
  const names = rounds.map((b) =>
    b.routeName && b.measuredAt ? `${b.routeName}, ${shortTime(b.measuredAt)}` : 'another round',
  );
  return `◇ ${o.own ? 'This round and ' : ''}${names.join('; ')}`;
}

const pointColumns = (origins: Map<string, PointOrigin>): Column<StatePointResult>[] => [
  {
    key: 'id',
    label: 'Point',
    flex: 2.4,
    render: (p) => (
      <ThemedText variant="label">
        <ThemedText variant="label" bold>
          {p.id}
        </ThemedText>
        {` ${p.label}`}
      </ThemedText>
    ),
  },
  { key: 'pm', label: 'p read, bar', flex: 1, numeric: true, render: (p) => f(p.measured.p, 3, 1e-5) },
  { key: 'pr', label: 'p balanced, bar', flex: 1, numeric: true, render: (p) => f(p.reconciled.p, 3, 1e-5) },
  { key: 'Tm', label: 'T read, °C', flex: 1, numeric: true, render: (p) => f(p.measured.T, 1, 1, -273.15) },
  { key: 'Tr', label: 'T balanced, °C', flex: 1, numeric: true, render: (p) => f(p.reconciled.T, 1, 1, -273.15) },
  { key: 'h', label: 'h, kJ/kg', flex: 1, numeric: true, render: (p) => f(p.reconciled.h, 1, 1e-3) },
  { key: 's', label: 's, kJ/(kg·K)', flex: 1, numeric: true, render: (p) => f(p.reconciled.s, 4, 1e-3) },
  { key: 'x', label: 'x', flex: 0.7, numeric: true, render: (p) => f(p.reconciled.x, 3) },
  { key: 'm', label: 'ṁ, t/h', flex: 0.9, numeric: true, render: (p) => f(p.reconciled.m, 2, 3.6) },
  {
    key: 'from',
    label: 'Read on',
    flex: 1.6,
    render: (p) => {
      const o = origins.get(p.id);
      return (
        <ThemedText
          variant="label"
          tone={o?.borrowed.length ? 'info' : undefined}
          muted={!o}
          testID={`cycle-point-${p.id}-origin`}
        >
          {originWords(o, p)}
        </ThemedText>
      );
    },
  },
];

function showBalance(r: BalanceRow, v: number | null): string {
  if (v === null) return '—';
  return r.unit === 'W'
    ? `${fixed(v / 1e3, 1)} kW`
    : r.unit === 'kg/s'
      ? `${fixed(v * 3.6, 3)} t/h`
      : `${fixed(v / 1e3, 2)} kJ/kg`;
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
  {
    key: 'meas',
    label: 'Residual as read',
    flex: 1.2,
    numeric: true,
    render: (b) => showBalance(b.row, b.row.measured?.residual ?? null),
  },
  { key: 'sig', label: '±σ', flex: 1, numeric: true, render: (b) => showBalance(b.row, b.row.measuredSigma) },
  {
    key: 'rec',
    label: 'Residual balanced',
    flex: 1.2,
    numeric: true,
    render: (b) => showBalance(b.row, b.row.reconciled?.residual ?? null),
  },
];

export const NOT_DETERMINABLE = 'not determinable from these instruments';

const joinTags = (t: string[]) => (t.length <= 1 ? t.join('') : `${t.slice(0, -1).join(', ')} and ${t[t.length - 1]}`);

/** The balanced value, or the words that say it cannot be had from these instruments. */
export function figureValueWords(p: PerformanceFigure): string {
  if (p.value === null) return '—';
  if (p.uncertainty && !p.uncertainty.determinable) return NOT_DETERMINABLE;
  return showFigure(p, p.value);
}

/** The 95 % interval of a balanced figure, or what would make a figure determinable. */
export function figureIntervalWords(p: PerformanceFigure): string {
  const u = p.uncertainty;
  if (p.value === null) return '—';
  if (!u) return 'no interval (the balances did not close)';
  if (u.U === 0) return 'fixed by the model (no reading moves it)';
  if (u.determinable) {
    // a fraction cannot leave 0–100 %: the interval is cut there, and says so
    const lo = p.unit === '1' ? Math.max(0, p.value - u.U) : p.value - u.U;
    const hi = p.unit === '1' ? Math.min(1, p.value + u.U) : p.value + u.U;
    const cut = lo !== p.value - u.U ? ' (cut at 0 %)' : hi !== p.value + u.U ? ' (cut at 100 %)' : '';
    return `${showFigure(p, lo)} to ${showFigure(p, hi)}${cut}`;
  }
  const tags = u.budget.map((b) => b.tag);
  const share = Math.round(100 * u.budget.reduce((a, b) => a + b.share, 0));
  const who = `${joinTags(tags)} carr${tags.length > 1 ? 'y' : 'ies'} ${share} % of its variance`;
  return u.reduceBy !== null
    ? `±${showFigure(p, u.U)}: ${who}; ${tags.length > 1 ? 'their' : 'its'} σ would have to be ${u.reduceBy.toFixed(1)} times smaller`
    : `±${showFigure(p, u.U)}: ${who}; better instruments there alone would not do`;
}

const figureColumns: Column<PerformanceFigure>[] = [
  { key: 'label', label: 'Figure', flex: 2.5, render: (p) => p.label },
  {
    key: 'value',
    label: 'Balanced',
    flex: 1.2,
    numeric: true,
    render: (p) => (
      <ThemedText
        variant="label"
        numeric
        muted={figureValueWords(p) === NOT_DETERMINABLE}
        testID={`cycle-figure-${p.id}-value`}
      >
        {figureValueWords(p)}
      </ThemedText>
    ),
  },
  {
    key: 'interval',
    label: '95 % interval',
    flex: 2,
    numeric: true,
    render: (p) => (
      <ThemedText variant="label" numeric={!!p.uncertainty?.determinable} testID={`cycle-figure-${p.id}-interval`}>
        {figureIntervalWords(p)}
      </ThemedText>
    ),
  },
  {
    key: 'measured',
    label: 'As read',
    flex: 1,
    numeric: true,
    render: (p) => (p.uncertainty && !p.uncertainty.determinable ? '—' : showFigure(p, p.measured)),
  },
];

/** The performance figures with their intervals. */
export function PerformanceTable({ figures }: { figures: PerformanceFigure[] }) {
  return (
    <View style={styles.stack}>
      <ThemedText variant="caption" muted>
        {
          'Balanced: from the reconciled state, with the 95 % interval propagated from every reading’s uncertainty through the balances (GUM law of propagation, JCGM 100:2008). A figure whose interval is wider than half its meaningful span (0–100 % for an efficiency, 20 K for a temperature difference, ±25 % for a power or the heat rate) is '
        }
        {NOT_DETERMINABLE}
        {
          '; the line names the readings that carry its variance. As read: the readings alone, without the balances; their uncertainty is never smaller than the balanced one.'
        }
      </ThemedText>
      <DataTable
        rows={figures}
        columns={figureColumns}
        rowKey={(p) => p.id}
        testID="cycle-figures"
        rowTestID={(p) => `cycle-figure-${p.id}`}
      />
    </View>
  );
}

function Chart({ a, model, borrowed }: { a: RoundAnalysisResponse; model: unknown; borrowed: ReadonlySet<string> }) {
  const [width, setWidth] = useState(0);
  const fig = useMemo(() => tsFigure(a.statePoints, turbineSections(model), borrowed), [a, model, borrowed]);
  return (
    <View onLayout={(e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width))}>
      {width > 0 ? (
        <TsChart
          points={fig.points}
          lines={fig.lines}
          width={width}
          height={Math.min(520, Math.max(300, width * 0.7))}
        />
      ) : null}
    </View>
  );
}

export function CycleScreen({ roundId }: { roundId: string }) {
  const q = useRoundAnalysis(roundId);
  const ref = useSiteReference();
  if (q.error)
    return (
      <ThemedText tone="danger" testID="cycle-error">
        {q.error.message}
      </ThemedText>
    );
  if (!q.data) return <ThemedText muted>Loading…</ThemedText>;
  const a = q.data;
  const model = ref.data?.units.find((u) => u.id === a.unitId)?.model ?? null;
  const r = a.reconciliation;
  const balances: BalanceLine[] = a.balances.flatMap((b) =>
    b.rows.map((row) => ({ key: `${b.equipmentId}-${row.id}`, equipment: b.label, row })),
  );
  const origins = originsByPoint(a.readingOrigins);
  const borrowed = new Set([...origins.entries()].filter(([, o]) => o.borrowed.length > 0).map(([id]) => id));
  const others = [
    ...new Map((a.readingOrigins ?? []).filter((o) => !o.own).map((o) => [o.roundId ?? '?', o])).values(),
  ];
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
        {r.suspects.length ? (
          <ThemedText variant="label" tone="danger">{`◆ Suspect: ${r.suspects.join(', ')}`}</ThemedText>
        ) : null}
        {a.modelVersionMismatch ? (
          <ThemedText variant="caption" muted>
            The phone recorded this round against an older model of the unit.
          </ThemedText>
        ) : null}
      </Card>
      {others.length ? (
        <Card testID="cycle-borrowed">
          <ThemedText variant="label" bold>
            Readings from other rounds of the unit
          </ThemedText>
          <ThemedText variant="caption" muted>
            The balances take the whole unit. What this round’s route does not read comes from the latest reading of
            another round within {ROUND_CHECK_WINDOW_HOURS} hours; those points say “◇” in the table and have a dashed
            ring on the chart.
          </ThemedText>
          {others.map((o) => {
            const n = (a.readingOrigins ?? []).filter((x) => !x.own && x.roundId === o.roundId).length;
            const words = `${n} reading${n === 1 ? '' : 's'}`;
            return o.roundId ? (
              <Link key={o.roundId} href={`/eng/rounds/${o.roundId}`} asChild>
                <Pressable accessibilityRole="link" style={styles.link} testID={`cycle-borrowed-${o.roundId}`}>
                  <ThemedText
                    variant="label"
                    tone="info"
                  >{`${o.routeName ?? 'Another round'}${o.measuredAt ? `, read ${new Date(o.measuredAt).toLocaleString()}` : ''} · ${words} →`}</ThemedText>
                </Pressable>
              </Link>
            ) : (
              <ThemedText
                key="unknown"
                variant="label"
                muted
                testID="cycle-borrowed-unknown"
              >{`A round no longer told apart (re-taken since) · ${words}`}</ThemedText>
            );
          })}
        </Card>
      ) : null}
      {a.findings.length ? (
        <Card testID="cycle-findings">
          <ThemedText variant="label" bold>
            Findings
          </ThemedText>
          {a.findings.map((fd) => (
            <View key={fd.id} style={styles.finding}>
              <SeverityMark severity={markOfFinding(fd.severity)} />
              <ThemedText variant="label" style={styles.grow}>
                {fd.message}
              </ThemedText>
            </View>
          ))}
        </Card>
      ) : null}
      <Card>
        <ThemedText variant="label" bold>
          Temperature–entropy chart
        </ThemedText>
        <ThemedText variant="caption" muted>
          Rings: as read (dashed: read on another round). Discs: balanced. Crosses: where each turbine section would end
          if it expanded without loss (dashed).
        </ThemedText>
        <Chart a={a} model={model} borrowed={borrowed} />
      </Card>
      <ThemedText variant="title">State points</ThemedText>
      <DataTable
        rows={a.statePoints}
        columns={pointColumns(origins)}
        rowKey={(p) => p.id}
        testID="cycle-points"
        rowTestID={(p) => `cycle-point-${p.id}`}
      />
      <ThemedText variant="title">Performance</ThemedText>
      <PerformanceTable figures={a.performance} />
      <ThemedText variant="title">Balances</ThemedText>
      <DataTable rows={balances} columns={balanceColumns} rowKey={(b) => b.key} testID="cycle-balances" />
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  finding: { flexDirection: 'row', gap: space.sm, alignItems: 'flex-start' },
  grow: { flex: 1 },
  link: { minHeight: touchTarget, justifyContent: 'center' },
});
