/**
 * What a planner can do to a work order from where it stands in the flow (the server says which
 * actions it allows): triage, assign, schedule, start, close (a calibration asks for as found and
 * as left), cancel with a reason, comment, merge duplicates. Every action goes through
 * useWorkOrderAction: the screen changes at once and changes back if the server refuses.
 */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { space } from '@/constants/theme';
import { useSession } from '@/hooks/session';
import { useAssignees } from '@/hooks/queries/admin';
import { useWorkOrderAction, useWorkOrders, type ActionVariables } from '@/hooks/queries/work-orders';
import type { WorkOrderDetail } from '@/shared/api/work-orders';
import { Button } from './button';
import { Card } from './card';
import { Field } from './field';
import { ThemedText } from './themed-text';

export const todayIso = () => new Date().toISOString().slice(0, 10);

const priorityNames = { 1: '1 · Urgent', 2: '2 · Soon', 3: '3 · When convenient' } as const;

function Section({ title, children, testID }: { title: string; children: React.ReactNode; testID: string }) {
  return (
    <Card testID={testID}>
      <ThemedText variant="label" bold>
        {title}
      </ThemedText>
      {children}
    </Card>
  );
}

export function WorkOrderActions({ wo }: { wo: WorkOrderDetail }) {
  const act = useWorkOrderAction(wo.id);
  const { user } = useSession();
  const allowed = new Set(wo.allowedActions);
  const run = (v: ActionVariables, after?: () => void) => act.mutate(v, { onSuccess: () => after?.() });
  const busy = act.isPending;

  return (
    <View style={styles.stack} testID="wo-actions">
      {act.error ? (
        <ThemedText tone="danger" accessibilityRole="alert" testID="wo-action-error">
          {`Not saved: ${act.error.message}`}
        </ThemedText>
      ) : null}
      {allowed.has('triage') ? <TriageForm wo={wo} busy={busy} run={run} /> : null}
      {allowed.has('assign') ? (
        <AssignForm wo={wo} busy={busy} run={run} me={user ? { id: user.id, name: user.name } : null} />
      ) : null}
      {allowed.has('schedule') ? <ScheduleForm wo={wo} busy={busy} run={run} /> : null}
      {allowed.has('start') ? (
        <Section title="Start the work" testID="wo-start-section">
          <Button
            label="Mark as started"
            testID="wo-start"
            busy={busy}
            onPress={() => run({ action: 'start', body: {} })}
          />
        </Section>
      ) : null}
      {allowed.has('close') ? <CloseForm wo={wo} busy={busy} run={run} /> : null}
      {allowed.has('merge') ? <MergeForm wo={wo} busy={busy} run={run} /> : null}
      {allowed.has('comment') ? <CommentForm busy={busy} run={run} /> : null}
      {allowed.has('cancel') ? <CancelForm busy={busy} run={run} /> : null}
    </View>
  );
}

type FormProps = { wo: WorkOrderDetail; busy: boolean; run: (v: ActionVariables, after?: () => void) => void };

function TriageForm({ wo, busy, run }: FormProps) {
  const [priority, setPriority] = useState<1 | 2 | 3>(wo.priority as 1 | 2 | 3);
  const [due, setDue] = useState(wo.dueDate ?? '');
  const dueOk = due === '' || /^\d{4}-\d{2}-\d{2}$/.test(due);
  return (
    <Section title="Triage: how urgent, and by when" testID="wo-triage-section">
      <View style={styles.row}>
        {([1, 2, 3] as const).map((p) => (
          <Button
            key={p}
            label={priorityNames[p]}
            kind={priority === p ? 'primary' : 'plain'}
            selected={priority === p}
            testID={`wo-triage-p${p}`}
            onPress={() => setPriority(p)}
          />
        ))}
      </View>
      <Field
        label="Due date (YYYY-MM-DD)"
        value={due}
        onChangeText={setDue}
        testID="wo-triage-due"
        error={dueOk ? undefined : 'Write the date as 2026-12-01'}
      />
      <Button
        label="Save triage"
        testID="wo-triage-submit"
        busy={busy}
        disabled={!dueOk}
        onPress={() => run({ action: 'triage', body: { priority, ...(due ? { dueDate: due } : {}) } })}
      />
    </Section>
  );
}

function AssignForm({ wo, busy, run, me }: FormProps & { me: { id: string; name: string } | null }) {
  // The members list is for admins today; a planner gets a 403 and assigns by user id or to themselves.
  const members = useAssignees();
  const [userId, setUserId] = useState('');
  const uuidOk = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(userId.trim());
  return (
    <Section title={wo.assignee ? `Assigned to ${wo.assignee.name}` : 'Assign'} testID="wo-assign-section">
      {me ? (
        <Button
          label="Assign to me"
          kind="plain"
          testID="wo-assign-me"
          busy={busy}
          onPress={() => run({ action: 'assign', body: { userId: me.id, assigneeName: me.name } })}
        />
      ) : null}
      {members.data ? (
        <View style={styles.row}>
          {members.data.members
            .filter((m) => !m.disabled && m.role !== 'admin')
            .map((m) => (
              <Button
                key={m.userId}
                label={`${m.name} (${m.role})`}
                kind="plain"
                testID={`wo-assign-${m.userId}`}
                busy={busy}
                onPress={() => run({ action: 'assign', body: { userId: m.userId, assigneeName: m.name } })}
              />
            ))}
        </View>
      ) : (
        <>
          <Field
            label="Or a person's user id"
            value={userId}
            onChangeText={setUserId}
            autoCapitalize="none"
            testID="wo-assign-user"
            hint="The site's member list is open to admins only for now."
          />
          <Button
            label="Assign"
            testID="wo-assign-submit"
            busy={busy}
            disabled={!uuidOk}
            onPress={() => run({ action: 'assign', body: { userId: userId.trim() } }, () => setUserId(''))}
          />
        </>
      )}
    </Section>
  );
}

function ScheduleForm({ busy, run }: FormProps) {
  const [date, setDate] = useState(todayIso());
  const ok = /^\d{4}-\d{2}-\d{2}$/.test(date);
  return (
    <Section title="Schedule" testID="wo-schedule-section">
      <Field
        label="Work on (YYYY-MM-DD)"
        value={date}
        onChangeText={setDate}
        testID="wo-schedule-date"
        error={ok ? undefined : 'Write the date as 2026-12-01'}
      />
      <Button
        label="Schedule"
        testID="wo-schedule-submit"
        busy={busy}
        disabled={!ok}
        onPress={() => run({ action: 'schedule', body: { scheduledFor: date } })}
      />
    </Section>
  );
}

const num = (s: string) => (s.trim() === '' ? NaN : Number(s.replace(',', '.')));

function CloseForm({ wo, busy, run }: FormProps) {
  const calibrate = wo.kind === 'calibrate';
  const [asFound, setAsFound] = useState('');
  const [asLeft, setAsLeft] = useState('');
  const [date, setDate] = useState(todayIso());
  const [note, setNote] = useState('');
  const f = num(asFound);
  const l = num(asLeft);
  const ok = !calibrate || (Number.isFinite(f) && Number.isFinite(l) && /^\d{4}-\d{2}-\d{2}$/.test(date));
  const unit = wo.calibrations[0]?.unit;
  const submit = () =>
    run({
      action: 'close',
      body: calibrate
        ? { calibration: { asFound: f, asLeft: l, calibratedOn: date, ...(note.trim() ? { note: note.trim() } : {}) } }
        : note.trim()
          ? { comment: note.trim() }
          : {},
    });
  return (
    <Section title={calibrate ? 'Close with the calibration' : 'Close'} testID="wo-close-section">
      {calibrate ? (
        <>
          <ThemedText
            variant="caption"
            muted
          >{`As the gauge face shows it${unit ? ` (${unit})` : ', in the instrument’s own unit'}, against the reference standard.`}</ThemedText>
          <View style={styles.row}>
            <View style={styles.grow}>
              <Field
                label="As found"
                value={asFound}
                onChangeText={setAsFound}
                keyboardType="decimal-pad"
                testID="wo-close-asfound"
                error={asFound && !Number.isFinite(f) ? 'A number, please' : undefined}
              />
            </View>
            <View style={styles.grow}>
              <Field
                label="As left"
                value={asLeft}
                onChangeText={setAsLeft}
                keyboardType="decimal-pad"
                testID="wo-close-asleft"
                error={asLeft && !Number.isFinite(l) ? 'A number, please' : undefined}
              />
            </View>
          </View>
          <Field label="Calibrated on (YYYY-MM-DD)" value={date} onChangeText={setDate} testID="wo-close-date" />
        </>
      ) : null}
      <Field label="Closing note" value={note} onChangeText={setNote} multiline testID="wo-close-note" />
      <Button
        label="Close the work order"
        kind="accent"
        testID="wo-close-submit"
        busy={busy}
        disabled={!ok}
        onPress={submit}
      />
    </Section>
  );
}

function MergeForm({ wo, busy, run }: FormProps) {
  const others = useWorkOrders({
    status: ['active'],
    ...(wo.instrumentTag ? { tag: wo.instrumentTag } : { kind: [wo.kind] }),
    limit: 50,
  });
  const [chosen, setChosen] = useState<string[]>([]);
  const candidates = (others.data?.items ?? []).filter((o) => o.id !== wo.id && o.unitId === wo.unitId);
  if (candidates.length === 0) return null;
  return (
    <Section title="Merge duplicates into this one" testID="wo-merge-section">
      <View style={styles.row}>
        {candidates.map((o) => (
          <Button
            key={o.id}
            label={`${o.number} · ${o.title}`}
            kind={chosen.includes(o.id) ? 'primary' : 'plain'}
            selected={chosen.includes(o.id)}
            testID={`wo-merge-${o.number}`}
            onPress={() => setChosen((c) => (c.includes(o.id) ? c.filter((x) => x !== o.id) : [...c, o.id]))}
          />
        ))}
      </View>
      <Button
        label="Merge"
        testID="wo-merge-submit"
        busy={busy}
        disabled={chosen.length === 0}
        onPress={() => run({ action: 'merge', body: { duplicateIds: chosen } }, () => setChosen([]))}
      />
    </Section>
  );
}

function CommentForm({ busy, run }: Omit<FormProps, 'wo'>) {
  const [text, setText] = useState('');
  return (
    <Section title="Comment" testID="wo-comment-section">
      <Field label="Comment" value={text} onChangeText={setText} multiline testID="wo-comment-text" />
      <Button
        label="Add comment"
        kind="plain"
        testID="wo-comment-submit"
        busy={busy}
        disabled={!text.trim()}
        onPress={() => run({ action: 'comment', body: { comment: text.trim() } }, () => setText(''))}
      />
    </Section>
  );
}

function CancelForm({ busy, run }: Omit<FormProps, 'wo'>) {
  const [reason, setReason] = useState('');
  return (
    <Section title="Cancel" testID="wo-cancel-section">
      <Field label="Why is it cancelled?" value={reason} onChangeText={setReason} testID="wo-cancel-reason" />
      <Button
        label="Cancel the work order"
        kind="danger"
        testID="wo-cancel-submit"
        busy={busy}
        disabled={!reason.trim()}
        onPress={() => run({ action: 'cancel', body: { reason: reason.trim() } })}
      />
    </Section>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.md },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  grow: { flexGrow: 1, flexBasis: 140 },
});
