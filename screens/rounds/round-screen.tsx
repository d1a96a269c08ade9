import { useRouter } from 'expo-router';
import { useCallback, useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Caution } from '@/components/caution';
import { CheckField, type CheckValue } from '@/components/check-field';
import { PhotoThumb } from '@/components/photo-thumb';
import { RoundCheckSummary } from '@/components/round-check-summary';
import { parseTyped, ReadingField } from '@/components/reading-field';
import { StopList, type StopSummary } from '@/components/stop-list';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { pickPhoto } from '@/lib/pick-photo';
import { warmUpRoundCheck } from '@/lib/round-check-runner';
import { useSession } from '@/hooks/session';
import {
  flagCodes,
  flagsFor,
  lastStopOf,
  loadRound,
  missingOf,
  ROUND_STOP_META,
  roundSendState,
  siOf,
  type RoundData,
  type RoundSendState,
} from '@/offline/round';
import { useWide } from '@/hooks/use-wide';
import { useStore, useStoreQuery } from '@/offline/use-offline';
import type { RouteReading } from '@/shared/route/template';
import { UnitError, unitLabel, type Unit } from '@/shared/units';

function bandText(r: RouteReading): string {
  return `${r.band.min} – ${r.band.max}`;
}

function answerText(a: CheckValue | undefined): string {
  if (!a) return 'Not answered';
  if (a.kind === 'yes-no') return a.value ? 'Yes' : 'No';
  return a.value;
}

/** What is true of a finished round's records: still on this device, refused, or all with the server. */
function finishedBanner(st: RoundSendState | undefined): string {
  if (!st) return 'This round is finished.';
  if (st.refused > 0)
    return `This round is finished. The server refused ${st.refused} of its records: see Outbox for why.`;
  if (st.waiting > 0)
    return `This round is finished and read-only. ${st.waiting} of its records are on this device only, not sent yet; they go when there is signal.`;
  return 'This round is finished and read-only. Everything is sent: the server has it and analyses it there; this device is not told when that is done.';
}

/** Walking a round: the stop list, the stop's readings and checks, photos, and finishing. */
export function RoundScreen({
  roundId,
  initialStop,
  focusTag,
}: {
  roundId: string;
  /** The stop to open at; absent: the stop last shown for this round on this device. */
  initialStop?: number;
  /** A reading to open with the cursor in its field (a re-take). */
  focusTag?: string;
}) {
  const { store, actions, state, error } = useStore();
  const { membership } = useSession();
  const router = useRouter();
  const wide = useWide();
  const [stopIndex, setStopIndex] = useState(initialStop ?? 0);
  // the stop is remembered once the one to open at is known (else a first 0 would overwrite it)
  const [restored, setRestored] = useState(initialStop !== undefined);
  const [finishing, setFinishing] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const { data, error: readError } = useStoreQuery(
    (s) => loadRound(s, roundId, membership?.siteId ?? null),
    `${roundId}|${membership?.siteId ?? ''}`,
  );
  const { data: sendState } = useStoreQuery((s) => roundSendState(s, roundId), roundId);
  // the round check's engine gets compiled while the technician walks (a worker on the web)
  useEffect(() => warmUpRoundCheck(), []);
  useEffect(() => {
    if (restored || !store) return;
    let live = true;
    lastStopOf(store, roundId).then(
      (i) => live && (setStopIndex(i), setRestored(true)),
      () => live && setRestored(true),
    );
    return () => {
      live = false;
    };
  }, [restored, store, roundId]);
  useEffect(() => {
    if (restored && store) void store.setMeta(ROUND_STOP_META(roundId), String(stopIndex)).catch(() => undefined);
  }, [restored, store, roundId, stopIndex]);

  const stops: StopSummary[] = useMemo(
    () =>
      data?.template.stops.map((s) => ({
        id: s.id,
        name: s.name,
        area: s.area,
        total: s.readings.length + s.checks.length,
        done: s.readings.filter((r) => data.readings[r.tag]).length + s.checks.filter((c) => data.answers[c.id]).length,
      })) ?? [],
    [data],
  );

  const saveReading = useCallback(
    async (d: RoundData, spec: RouteReading, text: string): Promise<string | null> => {
      if (!actions) return 'The device store is not open.';
      const parsed = parseTyped(text);
      if ('error' in parsed) return parsed.error;
      const inst = d.instruments[spec.tag];
      if (!inst) return `${spec.tag} is not among this unit's instruments on this device; sync, then try again.`;
      let valueSI: number;
      try {
        valueSI = siOf(inst.quantity, parsed.value, spec.unit, spec.reference, d.barometricPa);
      } catch (e) {
        return e instanceof UnitError ? e.message : String(e);
      }
      const flags = flagsFor(d, spec, valueSI);
      const cur = d.readings[spec.tag];
      const t0 = globalThis.performance?.now();
      try {
        await actions.recordReading({
          roundId,
          instrumentTag: spec.tag,
          valueTyped: parsed.value,
          unit: spec.unit,
          reference: spec.reference ?? null,
          flags: flags.map((f) => ({ code: flagCodes[f.kind], message: f.message })),
          confirmedAfterFlag: false,
          supersedes: cur?.id ?? null,
        });
      } catch (e) {
        // never a silent drop: the field says why the device did not keep it
        return e instanceof Error ? e.message : String(e);
      }
      // User Timing: from Save to the reading and its outbox row committed on the device (bench/device-save.bench.ts).
      if (t0 !== undefined) globalThis.performance?.measure?.('trueround:reading-saved', { start: t0 });
      return null;
    },
    [actions, roundId],
  );

  if (state === 'locked' || state === 'error')
    return (
      <ThemedText tone="danger" testID="store-error">
        {error?.message}
      </ThemedText>
    );
  if (readError)
    return (
      <ThemedText tone="danger" testID="round-error">
        {readError.message}
      </ThemedText>
    );
  if (!data || !store || !actions) return <ThemedText muted>Opening the round…</ThemedText>;

  const stopAt = Math.min(stopIndex, data.template.stops.length - 1);
  const stop = data.template.stops[stopAt];
  const missing = missingOf(data);
  const gapCount = missing.readings.length + missing.checks.length + missing.photos.length;
  const finished = data.round.status === 'finished';
  const readOnlyNote = finished
    ? 'Finished: this value can no longer be changed on the device. If it is wrong, tell your supervisor and take it again on the next round.'
    : undefined;

  const attach = async (readingId: string | null, checkId: string | null) => {
    setProblem(null);
    try {
      const p = await pickPhoto('library');
      if (p) await actions.attachPhoto({ roundId, readingId, checkId, bytes: p.bytes, mime: p.mime });
    } catch (e) {
      setProblem(e instanceof Error ? e.message : String(e));
    }
  };

  const stopBody = (
    <View style={styles.stop} testID="stop-body">
      <View style={styles.stopHead}>
        <ThemedText variant="caption" muted>
          Stop {stopAt + 1} of {data.template.stops.length} · {stop.area}
        </ThemedText>
        <ThemedText variant="title" testID="stop-name">
          {stop.name}
        </ThemedText>
      </View>
      {stop.caution ? <Caution testID="stop-caution">{stop.caution}</Caution> : null}
      {stop.readings.map((spec) => {
        const cur = data.readings[spec.tag];
        const inst = data.instruments[spec.tag];
        const valueSI = cur && cur.valueTyped !== null ? data.values[spec.tag] : undefined;
        const flags = valueSI !== undefined ? flagsFor(data, spec, valueSI) : [];
        const photos = data.photos.filter((p) => cur && p.readingId === cur.id);
        return (
          <View key={spec.tag} style={styles.gapSm}>
            <ReadingField
              tag={spec.tag}
              description={data.labels[spec.tag] ?? (inst ? undefined : "Not in this unit's instrument list")}
              unitLabel={unitLabel(spec.unit as Unit, spec.reference)}
              bandText={bandText(spec)}
              saved={cur?.valueTyped !== null && cur?.valueTyped !== undefined ? String(cur.valueTyped) : undefined}
              skipped={cur?.skipReason ?? null}
              confirmed={cur?.confirmedAfterFlag ?? false}
              flags={flags}
              readOnly={finished}
              readOnlyNote={readOnlyNote}
              autoFocus={focusTag === spec.tag}
              onSave={(text) => saveReading(data, spec, text)}
              onSkip={(reason) =>
                void actions.recordReading({
                  roundId,
                  instrumentTag: spec.tag,
                  valueTyped: null,
                  unit: spec.unit,
                  reference: spec.reference ?? null,
                  skipReason: reason,
                  supersedes: cur?.id ?? null,
                })
              }
              onConfirm={() =>
                cur &&
                void actions.recordReading({
                  roundId,
                  instrumentTag: spec.tag,
                  valueTyped: cur.valueTyped,
                  unit: cur.unit,
                  reference: cur.reference,
                  flags: flags.map((f) => ({ code: flagCodes[f.kind], message: f.message })),
                  confirmedAfterFlag: true,
                  supersedes: cur.id,
                })
              }
              onPhoto={finished ? undefined : () => void attach(cur?.id ?? null, null)}
            />
            {inst?.status === 'out-of-service' ? (
              <ThemedText variant="caption" tone="warning" testID={`out-of-service-${spec.tag}`}>
                {spec.tag} is out of service: a reading is kept, but the round check and the analysis do not reconcile
                it.
              </ThemedText>
            ) : null}
            {photos.length ? (
              <View style={styles.thumbs}>
                {photos.map((p) => (
                  <PhotoThumb
                    key={p.id}
                    store={store}
                    id={p.id}
                    mime={p.mime}
                    state={p.uploadState}
                    testID={`photo-${spec.tag}`}
                  />
                ))}
              </View>
            ) : null}
          </View>
        );
      })}
      {stop.checks.map((c) => {
        const a = data.answers[c.id];
        const photos = data.photos.filter((p) => p.checkId === c.id);
        return (
          <View key={c.id} style={styles.gapSm}>
            {finished ? (
              <View style={styles.readOnly} testID={`check-${c.id}-readonly`}>
                <ThemedText variant="label">{c.prompt}</ThemedText>
                <ThemedText bold>{answerText(a?.answer as CheckValue | undefined)}</ThemedText>
              </View>
            ) : (
              <CheckField
                check={c}
                answer={a?.answer as CheckValue | undefined}
                onAnswer={(v) => void actions.answerCheck({ roundId, checkId: c.id, answer: v })}
                onPhoto={() => void attach(null, c.id)}
                photoCount={photos.length}
              />
            )}
            {c.photoRequired && !finished && photos.length === 0 ? (
              <ThemedText variant="label" tone="warning" testID={`check-${c.id}-photo-needed`}>
                A photo is required here before the round can be finished complete.
              </ThemedText>
            ) : null}
            {photos.length ? (
              <View style={styles.thumbs}>
                {photos.map((p) => (
                  <PhotoThumb
                    key={p.id}
                    store={store}
                    id={p.id}
                    mime={p.mime}
                    state={p.uploadState}
                    testID={`photo-check-${c.id}`}
                  />
                ))}
              </View>
            ) : null}
          </View>
        );
      })}
      {problem ? (
        <ThemedText tone="danger" testID="photo-problem">
          {problem}
        </ThemedText>
      ) : null}
      <View style={styles.nav}>
        <Button
          testID="stop-prev"
          label="Previous stop"
          kind="plain"
          disabled={stopAt === 0}
          onPress={() => setStopIndex((i) => Math.max(0, i - 1))}
        />
        <Button
          testID="round-check"
          label="Check the round"
          kind="plain"
          onPress={() => router.push(`/tech/round/${roundId}/check`)}
        />
        {stopAt < data.template.stops.length - 1 ? (
          <Button testID="stop-next" label="Next stop" onPress={() => setStopIndex(stopAt + 1)} />
        ) : finished ? null : (
          <Button testID="round-roundCheck" label="Finish…" kind="accent" onPress={() => setFinishing(true)} />
        )}
      </View>
    </View>
  );

  const finish = async () => {
    setProblem(null);
    try {
      await actions.finishRound(roundId);
      router.replace('/tech');
    } catch (e) {
      setProblem(e instanceof Error ? e.message : String(e));
    }
  };

  const finishPanel = (
    <Card testID="finish-panel">
      <ThemedText variant="title">Finish this round</ThemedText>
      {gapCount === 0 ? (
        <ThemedText testID="finish-complete">Every reading, check and required photo is done.</ThemedText>
      ) : (
        <View style={styles.gapSm} testID="finish-missing">
          <ThemedText bold tone="warning" testID="finish-blocked">
            {gapCount === 1 ? '1 gap' : `${gapCount} gaps`} — the round is not complete:
          </ThemedText>
          {missing.readings.map((m) => (
            <ThemedText key={m.tag} testID={`missing-${m.tag}`}>
              Not read: {m.tag} ({m.stop})
            </ThemedText>
          ))}
          {missing.checks.map((m) => (
            <ThemedText key={m.id} testID={`missing-check-${m.id}`}>
              Not answered: {m.prompt} ({m.stop})
            </ThemedText>
          ))}
          {missing.photos.map((m) => (
            <ThemedText key={m.id} testID={`missing-photo-${m.id}`}>
              Photo required: {m.prompt} ({m.stop})
            </ThemedText>
          ))}
        </View>
      )}
      <RoundCheckSummary roundId={roundId} onOpen={() => router.push(`/tech/round/${roundId}/check`)} />
      {problem ? (
        <ThemedText tone="danger" testID="finish-problem">
          {problem}
        </ThemedText>
      ) : null}
      <View style={styles.nav}>
        <Button testID="finish-back" label="Back to the stops" kind="plain" onPress={() => setFinishing(false)} />
        {gapCount === 0 ? (
          <Button testID="finish-confirm" label="Finish round" kind="accent" onPress={finish} />
        ) : (
          <Button
            testID="finish-with-gaps"
            label={`Finish with ${gapCount === 1 ? 'this gap' : `these ${gapCount} gaps`}`}
            kind="danger"
            onPress={finish}
          />
        )}
      </View>
    </Card>
  );

  return (
    <View style={styles.gapLg} testID="round-screen">
      <ThemedText variant="title" testID="round-route">
        {data.routeName}
      </ThemedText>
      {finished ? (
        <ThemedText testID="round-finished" bold tone={sendState?.refused ? 'danger' : 'info'}>
          {finishedBanner(sendState)}
        </ThemedText>
      ) : null}
      {wide ? (
        <View style={styles.wideRow}>
          <View style={styles.side}>
            <StopList
              stops={stops}
              current={stopAt}
              onPick={(i) => {
                setStopIndex(i);
                setFinishing(false);
              }}
            />
          </View>
          <View style={styles.main}>{finishing ? finishPanel : stopBody}</View>
        </View>
      ) : finishing ? (
        finishPanel
      ) : (
        stopBody
      )}
      {!wide && !finishing ? <StopList stops={stops} current={stopAt} onPick={setStopIndex} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  gapSm: { gap: space.sm },
  gapLg: { gap: space.lg },
  stop: { gap: space.md },
  stopHead: { gap: space.xxs },
  thumbs: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  nav: { flexDirection: 'row', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap' },
  wideRow: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  side: { width: 280 },
  main: { flex: 1 },
  readOnly: { gap: space.xxs, paddingVertical: space.xs },
});
