/**
 * One work order: what and where, the actions (at the top on a phone), the evidence in short
 * (./components/work-order-summary), the evidence folded by round and paged, and its history
 * (the newest HISTORY_SHOWN events first, the rest on a press).
 */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Href } from 'expo-router';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Caution } from '@/components/caution';
import { SeverityMark } from '@/components/severity-mark';
import { ThemedText } from '@/components/themed-text';
import { WorkOrderActions } from '@/components/work-order-actions';
import { WorkOrderRounds } from '@/components/work-order-rounds';
import { WorkOrderSummary } from '@/components/work-order-summary';
import { space } from '@/constants/theme';
import { useWorkOrder } from '@/hooks/queries/work-orders';
import { useWide } from '@/hooks/use-wide';
import type { WorkOrderDetail } from '@/shared/api/work-orders';
import { kindWords, statusWords } from './work-orders-screen';

function Fact({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.fact}>
      <ThemedText variant="caption" muted>
        {label}
      </ThemedText>
      <ThemedText variant="label" bold testID={testID}>
        {value}
      </ThemedText>
    </View>
  );
}

/** History events shown before "Show all": an order an analysis keeps feeding gathers one per round. */
export const HISTORY_SHOWN = 8;

function History({ wo }: { wo: WorkOrderDetail }) {
  const [all, setAll] = useState(false);
  const newest = [...wo.events].reverse();
  const shown = all ? newest : newest.slice(0, HISTORY_SHOWN);
  return (
    <Card testID="wo-history">
      <ThemedText variant="label" bold>
        History
      </ThemedText>
      {shown.map((e) => (
        <View key={e.id} style={styles.event}>
          <ThemedText
            variant="caption"
            muted
          >{`${new Date(e.at).toLocaleString()} · ${e.actor?.name ?? 'Trueround'}`}</ThemedText>
          <ThemedText variant="label">
            {e.fromStatus && e.toStatus && e.fromStatus !== e.toStatus
              ? `${e.type}: ${statusWords[e.fromStatus]} → ${statusWords[e.toStatus]}`
              : e.type}
            {e.comment ? ` — “${e.comment}”` : ''}
          </ThemedText>
        </View>
      ))}
      {newest.length > shown.length ? (
        <Button
          kind="plain"
          label={`Show all ${newest.length} events`}
          onPress={() => setAll(true)}
          testID="wo-history-all"
        />
      ) : null}
      {wo.calibrations.map((c) => (
        <ThemedText key={c.id} variant="label" testID={`wo-calibration-${c.id}`}>
          {`Calibrated ${c.calibratedOn} by ${c.calibratedBy.name}: as found ${c.asFound} ${c.unit}, as left ${c.asLeft} ${c.unit}`}
        </ThemedText>
      ))}
    </Card>
  );
}

export function WorkOrderScreen({ id, cycleHref }: { id: string; cycleHref: (roundId: string) => Href }) {
  const q = useWorkOrder(id);
  const wide = useWide();
  if (q.error)
    return (
      <ThemedText tone="danger" testID="wo-error">
        {q.error.message}
      </ThemedText>
    );
  if (!q.data) return <ThemedText muted>Loading…</ThemedText>;
  const wo = q.data;
  const closed = wo.status === 'done' || wo.status === 'cancelled';
  const facts = (
    <Card testID="wo-facts">
      <View style={styles.titleRow}>
        <SeverityMark severity={wo.priority as 1 | 2 | 3} testID="wo-priority" />
        <ThemedText variant="label" bold testID="wo-status">
          {statusWords[wo.status]}
        </ThemedText>
      </View>
      <ThemedText variant="title" testID="wo-title">{`${wo.number} · ${wo.title}`}</ThemedText>
      <View style={styles.facts}>
        <Fact label="Kind" value={kindWords[wo.kind]} />
        <Fact
          label={wo.instrumentTag ? 'Instrument' : 'Equipment'}
          value={wo.instrumentTag ?? wo.equipmentRef ?? '—'}
          testID="wo-instrument"
        />
        <Fact label="Assigned to" value={wo.assignee?.name ?? 'Nobody yet'} testID="wo-assignee" />
        <Fact label="Due" value={wo.dueDate ?? '—'} testID="wo-due" />
        <Fact label="Scheduled" value={wo.scheduledFor ?? '—'} />
        <Fact label="Findings" value={String(wo.findingCount)} />
      </View>
      {wo.cancelReason ? <ThemedText variant="label">{`Cancelled: ${wo.cancelReason}`}</ThemedText> : null}
      {wo.mergedInto ? <ThemedText variant="label">{`Merged into ${wo.mergedInto.number}`}</ThemedText> : null}
    </Card>
  );
  const evidence = (
    <View style={styles.stack}>
      <WorkOrderSummary summary={wo.evidenceSummary} tag={wo.instrumentTag} />
      <ThemedText variant="title">Evidence by round</ThemedText>
      <WorkOrderRounds
        id={wo.id}
        first={wo.evidence}
        rounds={wo.evidencePage.rounds}
        limit={wo.evidencePage.limit}
        cycleHref={cycleHref}
      />
    </View>
  );
  const actions = closed ? null : <WorkOrderActions wo={wo} />;
  return (
    <View style={styles.stack} testID="wo-detail">
      {!closed ? (
        <Caution testID="wo-caution">
          {
            'The work is on live plant: steam and hot surfaces. Follow the site’s permit-to-work and lockout/tagout before anyone opens, isolates or removes an instrument.'
          }
        </Caution>
      ) : null}
      {facts}
      {wide ? (
        <View style={styles.columns}>
          <View style={styles.main}>{evidence}</View>
          <View style={styles.side}>
            {actions}
            <History wo={wo} />
          </View>
        </View>
      ) : (
        <>
          {actions}
          {evidence}
          <History wo={wo} />
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  titleRow: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center' },
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  fact: { minWidth: 120, gap: space.xxs },
  event: { gap: space.xxs },
  columns: { flexDirection: 'row', gap: space.xl, alignItems: 'flex-start' },
  main: { flex: 3, gap: space.lg },
  side: { flex: 2, gap: space.lg },
});
