/**
 * The planner's work orders: filters (status, priority, kind, instrument), a search on number,
 * title or tag, sorting and pages. A table on a wide screen, cards on a phone.
 */
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { DataTable, ExportButton, Pager, type Column } from '@/components/data-table';
import { Field } from '@/components/field';
import { FilterBar, type FilterGroup } from '@/components/filter-bar';
import { SeverityMark } from '@/components/severity-mark';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useWide } from '@/hooks/use-wide';
import { useWorkOrders, type WorkOrderFilters } from '@/hooks/queries/work-orders';
import {
  WORK_ORDER_KINDS,
  WORK_ORDER_SORTS,
  type WorkOrderKind,
  type WorkOrderSort,
  type WorkOrderStatus,
  type WorkOrderSummary,
} from '@/shared/api/work-orders';

export const statusWords: Record<WorkOrderStatus, string> = {
  open: 'New',
  triaged: 'Triaged',
  scheduled: 'Scheduled',
  'in-progress': 'Under way',
  done: 'Done',
  cancelled: 'Cancelled',
};
export const kindWords: Record<WorkOrderKind, string> = {
  calibrate: 'Calibrate',
  repair: 'Repair',
  inspect: 'Inspect',
  clean: 'Clean',
  'check-group': 'Check together',
};

const PAGE = 20;
const isSort = (s: string): s is WorkOrderSort => (WORK_ORDER_SORTS as readonly string[]).includes(s);

const columns: Column<WorkOrderSummary>[] = [
  { key: 'number', label: 'No.', flex: 0.8, sortKey: 'number', render: (w) => w.number, wideOnly: true },
  {
    key: 'priority',
    label: 'Priority',
    flex: 1,
    sortKey: 'priority',
    render: (w) => <SeverityMark severity={w.priority as 1 | 2 | 3} />,
  },
  { key: 'title', label: 'What', flex: 3.2, render: (w) => w.title, wideOnly: true },
  { key: 'kind', label: 'Kind', flex: 0.9, render: (w) => kindWords[w.kind] },
  { key: 'status', label: 'Status', flex: 1, render: (w) => statusWords[w.status] },
  { key: 'assignee', label: 'Assigned to', flex: 1.3, render: (w) => w.assignee?.name ?? '—' },
  { key: 'due', label: 'Due', flex: 1, sortKey: 'dueDate', numeric: true, render: (w) => w.dueDate ?? '—' },
  {
    key: 'opened',
    label: 'Opened',
    flex: 1,
    sortKey: 'openedAt',
    numeric: true,
    render: (w) => w.openedAt.slice(0, 10),
  },
];

export function WorkOrdersScreen() {
  const router = useRouter();
  const { membership } = useSession();
  const [status, setStatus] = useState<(WorkOrderStatus | 'active')[]>(['active']);
  const [priority, setPriority] = useState<(1 | 2 | 3)[]>([]);
  const [kind, setKind] = useState<WorkOrderKind[]>([]);
  const [tag, setTag] = useState('');
  const [q, setQ] = useState('');
  const [sort, setSort] = useState<WorkOrderSort>('priority');
  const [offset, setOffset] = useState(0);
  const wide = useWide();
  const [showFilters, setShowFilters] = useState(false);
  const chosenCount =
    priority.length +
    kind.length +
    (tag.trim() ? 1 : 0) +
    (status.length === 1 && status[0] === 'active' ? 0 : status.length);
  const filters: WorkOrderFilters = { status, priority, kind, tag, q, sort, limit: PAGE, offset };
  const list = useWorkOrders(filters);
  const reset =
    <T,>(set: (v: T) => void) =>
    (v: T) => {
      set(v);
      setOffset(0);
    };

  const groups = [
    {
      key: 'status',
      label: 'Status',
      options: [
        { value: 'active', label: 'Not closed' },
        ...(['open', 'triaged', 'scheduled', 'in-progress', 'done', 'cancelled'] as const).map((s) => ({
          value: s,
          label: statusWords[s],
        })),
      ],
      chosen: status,
      onChange: reset(setStatus),
    } as FilterGroup<WorkOrderStatus | 'active'>,
    {
      key: 'priority',
      label: 'Priority',
      options: [1, 2, 3].map((p) => ({ value: p, label: `${p} · ${['Urgent', 'Soon', 'Note'][p - 1]}` })),
      chosen: priority,
      onChange: reset(setPriority),
    } as FilterGroup<1 | 2 | 3>,
    {
      key: 'kind',
      label: 'Kind',
      options: WORK_ORDER_KINDS.map((k) => ({ value: k, label: kindWords[k] })),
      chosen: kind,
      onChange: reset(setKind),
    } as FilterGroup<WorkOrderKind>,
  ] as unknown as FilterGroup<string | number>[];

  return (
    <View style={styles.stack}>
      <View style={styles.head}>
        {!wide ? (
          <Button
            label={showFilters ? 'Hide filters' : `Filters${chosenCount ? ` (${chosenCount})` : ''}`}
            kind="plain"
            selected={showFilters}
            testID="wo-filters-toggle"
            onPress={() => setShowFilters((v) => !v)}
          />
        ) : null}
        {membership ? (
          <ExportButton
            path={`/api/sites/${membership.siteId}/exports/work-orders.csv`}
            filename="work-orders.csv"
            label="Export CSV"
            testID="wo-export"
          />
        ) : null}
      </View>
      {wide || showFilters ? (
        <FilterBar groups={groups} testID="wo-filter">
          <View style={styles.searches}>
            <View style={styles.grow}>
              <Field
                label="Search number, title or tag"
                value={q}
                onChangeText={reset(setQ)}
                autoCapitalize="characters"
                testID="wo-search"
              />
            </View>
            <View style={styles.grow}>
              <Field
                label="Instrument tag"
                value={tag}
                onChangeText={reset(setTag)}
                autoCapitalize="characters"
                placeholder="e.g. TI-301"
                testID="wo-filter-tag"
              />
            </View>
          </View>
        </FilterBar>
      ) : null}
      {wide || showFilters ? (
        <View style={styles.sortRow}>
          <ThemedText variant="caption" muted>
            Sort
          </ThemedText>
          {(
            [
              ['priority', 'Most urgent'],
              ['dueDate', 'Due first'],
              ['-openedAt', 'Newest'],
              ['number', 'Number'],
            ] as const
          ).map(([k, label]) => (
            <Button
              key={k}
              label={label}
              kind={sort === k ? 'primary' : 'plain'}
              selected={sort === k}
              testID={`wo-sort-${k}`}
              onPress={() => setSort(k)}
            />
          ))}
        </View>
      ) : (
        <Field
          label="Search number, title or tag"
          value={q}
          onChangeText={reset(setQ)}
          autoCapitalize="characters"
          testID="wo-search"
        />
      )}
      {list.error ? (
        <ThemedText tone="danger" testID="wo-list-error">
          {list.error.message}
        </ThemedText>
      ) : null}
      {list.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      {list.data ? (
        <>
          <DataTable
            rows={list.data.items}
            columns={columns}
            rowKey={(w) => w.id}
            testID="wo-table"
            rowTestID={(w) => `wo-row-${w.number}`}
            cardTitle={(w) => <ThemedText variant="label" bold>{`${w.number} · ${w.title}`}</ThemedText>}
            sort={sort}
            onSort={(s) => isSort(s) && setSort(s)}
            onPressRow={(w) => router.push(`/plan/work-orders/${w.id}`)}
            empty="No work orders match these filters."
          />
          <Pager offset={offset} limit={PAGE} total={list.data.total} onOffset={setOffset} testID="wo-pager" />
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  head: { flexDirection: 'row', justifyContent: 'flex-end', alignItems: 'center', flexWrap: 'wrap', gap: space.md },
  searches: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  grow: { flexGrow: 1, flexBasis: 220 },
  sortRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
});
