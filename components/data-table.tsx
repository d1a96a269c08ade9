/**
 * A table on a wide screen that turns into a list of cards on a phone. Columns say how to show a
 * row; a sortable column's header is a button (one press sorts by it, a second reverses). Numbers
 * stand right-aligned in tabular figures. Also: downloads that need the session's token (CSV
 * exports, photo thumbnails) fetched as a blob.
 */
import AsyncStorage from '@react-native-async-storage/async-storage';
import { useState, type ReactNode } from 'react';
import { Platform, Pressable, StyleSheet, View } from 'react-native';
import { radius, space, touchTarget } from '@/constants/theme';
import { API_BASE } from '@/lib/api-client';
import { parseStoredSession, useSession } from '@/hooks/session';
import { useTheme } from '@/hooks/use-theme';
import { useWide } from '@/hooks/use-wide';
import { Button } from './button';
import { Card } from './card';
import { ThemedText } from './themed-text';

export interface Column<T> {
  key: string;
  label: string;
  /** relative width on a wide screen */
  flex?: number;
  numeric?: boolean;
  /** the sort key sent for this column (ascending; "-" + key descending) */
  sortKey?: string;
  render: (row: T) => ReactNode;
  /** hidden on the phone card */
  wideOnly?: boolean;
}

export interface DataTableProps<T> {
  rows: T[];
  columns: Column<T>[];
  rowKey: (row: T) => string;
  /** the card's heading on a phone */
  cardTitle?: (row: T) => ReactNode;
  onPressRow?: (row: T) => void;
  sort?: string;
  onSort?: (sort: string) => void;
  testID: string;
  rowTestID?: (row: T) => string;
  empty?: string;
}

export function DataTable<T>({
  rows,
  columns,
  rowKey,
  cardTitle,
  onPressRow,
  sort,
  onSort,
  testID,
  rowTestID,
  empty = 'Nothing to show.',
}: DataTableProps<T>) {
  const wide = useWide();
  const { colors } = useTheme();
  if (rows.length === 0)
    return (
      <ThemedText muted testID={`${testID}-empty`}>
        {empty}
      </ThemedText>
    );

  if (!wide) {
    return (
      <View style={styles.cards} testID={testID}>
        {rows.map((row) => {
          const body = (
            <Card>
              {cardTitle ? cardTitle(row) : null}
              {columns
                .filter((c) => !c.wideOnly)
                .map((c) => (
                  <View key={c.key} style={styles.cardLine}>
                    <ThemedText variant="caption" muted>
                      {c.label}
                    </ThemedText>
                    <View style={styles.cardValue}>{wrap(c.render(row), c.numeric)}</View>
                  </View>
                ))}
            </Card>
          );
          return onPressRow ? (
            <Pressable
              key={rowKey(row)}
              accessibilityRole="button"
              testID={rowTestID?.(row)}
              onPress={() => onPressRow(row)}
            >
              {body}
            </Pressable>
          ) : (
            <View key={rowKey(row)} testID={rowTestID?.(row)}>
              {body}
            </View>
          );
        })}
      </View>
    );
  }

  return (
    <View
      style={[styles.table, { borderColor: colors.rule, backgroundColor: colors.surface }]}
      testID={testID}
      accessibilityRole="list"
    >
      <View style={[styles.row, styles.head, { borderColor: colors.rule, backgroundColor: colors.surfaceAlt }]}>
        {columns.map((c) => {
          const flex = { flex: c.flex ?? 1 };
          const active = sort === c.sortKey ? 'asc' : sort === `-${c.sortKey}` ? 'desc' : null;
          const label = `${c.label}${active === 'asc' ? ' ↑' : active === 'desc' ? ' ↓' : ''}`;
          return c.sortKey && onSort ? (
            <Pressable
              key={c.key}
              accessibilityRole="button"
              accessibilityLabel={`Sort by ${c.label}`}
              testID={`${testID}-sort-${c.key}`}
              onPress={() => onSort(active === 'asc' ? `-${c.sortKey}` : c.sortKey!)}
              style={[styles.cell, styles.headCell, flex]}
            >
              <ThemedText variant="label" bold numeric={c.numeric} tone={active ? 'accent' : undefined}>
                {label}
              </ThemedText>
            </Pressable>
          ) : (
            <View key={c.key} style={[styles.cell, styles.headCell, flex]}>
              <ThemedText variant="label" bold numeric={c.numeric}>
                {c.label}
              </ThemedText>
            </View>
          );
        })}
      </View>
      {rows.map((row) => {
        const cells = columns.map((c) => (
          <View key={c.key} style={[styles.cell, { flex: c.flex ?? 1 }]}>
            {wrap(c.render(row), c.numeric)}
          </View>
        ));
        return onPressRow ? (
          <Pressable
            key={rowKey(row)}
            accessibilityRole="button"
            testID={rowTestID?.(row)}
            onPress={() => onPressRow(row)}
            style={[styles.row, { borderColor: colors.rule }]}
          >
            {cells}
          </Pressable>
        ) : (
          <View key={rowKey(row)} testID={rowTestID?.(row)} style={[styles.row, { borderColor: colors.rule }]}>
            {cells}
          </View>
        );
      })}
    </View>
  );
}

function wrap(v: ReactNode, numeric?: boolean): ReactNode {
  return typeof v === 'string' || typeof v === 'number' ? (
    <ThemedText variant="label" numeric={numeric}>
      {String(v)}
    </ThemedText>
  ) : (
    v
  );
}

/** Paging under a list: "21–40 of 57" with previous and next. */
export function Pager({
  offset,
  limit,
  total,
  onOffset,
  testID,
  noun = ['work order', 'work orders'],
}: {
  offset: number;
  limit: number;
  total: number;
  onOffset: (o: number) => void;
  testID: string;
  /** what is counted, one and many */
  noun?: [string, string];
}) {
  if (total <= limit && offset === 0)
    return (
      <ThemedText variant="caption" muted testID={`${testID}-count`}>
        {total === 1 ? `1 ${noun[0]}` : `${total} ${noun[1]}`}
      </ThemedText>
    );
  return (
    <View style={styles.pager}>
      <Button
        label="Previous"
        kind="plain"
        testID={`${testID}-prev`}
        disabled={offset === 0}
        onPress={() => onOffset(Math.max(0, offset - limit))}
      />
      <ThemedText
        variant="label"
        testID={`${testID}-count`}
      >{`${total ? offset + 1 : 0}–${Math.min(total, offset + limit)} of ${total}`}</ThemedText>
      <Button
        label="Next"
        kind="plain"
        testID={`${testID}-next`}
        disabled={offset + limit >= total}
        onPress={() => onOffset(offset + limit)}
      />
    </View>
  );
}

async function storedToken(): Promise<string | null> {
  return parseStoredSession(await AsyncStorage.getItem('trueround.session'))?.accessToken ?? null;
}

/** GET a path with the session's token as a blob (refreshing the token once on 401 through the session). */
export async function fetchAuthedBlob(path: string, refresh: () => Promise<unknown>): Promise<Blob> {
  const get = async () =>
    fetch(`${API_BASE}${path}`, { headers: { Authorization: `Bearer ${(await storedToken()) ?? ''}` } });
  let res = await get();
  if (res.status === 401) {
    await refresh().catch(() => undefined);
    res = await get();
  }
  if (!res.ok) throw new Error(`The server answered ${res.status} for ${path}.`);
  return res.blob();
}

/** A button that downloads a CSV export (web: an <a download> on an object URL). */
export function ExportButton({
  path,
  filename,
  label,
  testID,
}: {
  path: string;
  filename: string;
  label: string;
  testID: string;
}) {
  const { request } = useSession();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const go = async () => {
    setBusy(true);
    setError(null);
    try {
      const blob = await fetchAuthedBlob(path, () => request('/api/me'));
      if (Platform.OS === 'web') {
        const url = URL.createObjectURL(blob);
        const a = document.createElement('a');
        a.href = url;
        a.download = filename;
        document.body.appendChild(a);
        a.click();
        a.remove();
        setTimeout(() => URL.revokeObjectURL(url), 10_000);
      } else {
        setError('Downloads open on the web app.');
      }
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  };
  return (
    <View style={styles.exportWrap}>
      <Button label={label} kind="plain" busy={busy} testID={testID} onPress={go} />
      {error ? (
        <ThemedText variant="caption" tone="danger" testID={`${testID}-error`}>
          {error}
        </ThemedText>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  cards: { gap: space.md },
  cardLine: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.md },
  cardValue: { flexShrink: 1, alignItems: 'flex-end' },
  table: { borderWidth: 1, borderRadius: radius.sm, overflow: 'hidden' },
  head: { borderBottomWidth: 2 },
  row: { flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, minHeight: touchTarget },
  cell: { paddingHorizontal: space.sm, paddingVertical: space.xs, justifyContent: 'center' },
  headCell: { minHeight: touchTarget },
  pager: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.md },
  exportWrap: { gap: space.xs },
});
