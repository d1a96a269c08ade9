import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { RoundCheckBalanceLine } from '@/components/round-check-balance-line';
import { RoundCheckRetakeItem } from '@/components/round-check-retake-item';
import { roundCheckHeadline } from '@/components/round-check-summary';
import { RoundCheckSuspect } from '@/components/round-check-suspect';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useRoundCheck } from '@/hooks/use-round-check';
import { useWide } from '@/hooks/use-wide';
import { useStore } from '@/offline/use-offline';
import type { RetakeItem, RoundCheck } from '@/shared/round-check';

/** "07:40": the device's local time, 24-hour, as shift logs write it */
function clock(ms: number): string {
  const d = new Date(ms);
  return `${String(d.getHours()).padStart(2, '0')}:${String(d.getMinutes()).padStart(2, '0')}`;
}

const lcFirst = (t: string) => (t.length > 1 && t[1] === t[1].toLowerCase() ? t[0].toLowerCase() + t.slice(1) : t);

function joinNames(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** "For the instruments not on this route, the check uses the boiler house round of 07:40 …" */
function borrowedText(r: RoundCheck): string {
  const b = r.assembled.borrowed;
  const h = r.assembled.windowHours;
  if (b.length === 0)
    return `Only this round's readings are used: no other round of this unit in the last ${h} h is on this device.`;
  const rounds = joinNames(b.map((x) => `the ${lcFirst(x.routeName)} round of ${clock(x.startedAt)}`));
  return `For the instruments not on this route, the check uses ${rounds} (the latest reading of each within the last ${h} h on this device).`;
}

/** The round check: balances, suspects and the re-take list, from the device alone. */
export function RoundCheckScreen({ roundId }: { roundId: string }) {
  const { actions } = useStore();
  const router = useRouter();
  const wide = useWide();
  const { load, roundCheck, ms, checking, error } = useRoundCheck(roundId);
  const [picked, setPicked] = useState<string | null>(null);
  const [finishing, setFinishing] = useState(false);

  if (error)
    return (
      <ThemedText tone="danger" testID="round-check-error">
        {error.message}
      </ThemedText>
    );
  if (!load)
    return (
      <ThemedText muted testID="round-check-opening">
        Opening the round…
      </ThemedText>
    );
  if (!load.ok) {
    return (
      <View style={styles.stack} testID="round-check-screen">
        <ThemedText tone="warning" testID="round-check-problem">
          {load.problem}
        </ThemedText>
        <Button
          testID="round-check-back"
          label="Back to the stops"
          kind="plain"
          onPress={() => router.push(`/tech/round/${roundId}`)}
        />
      </View>
    );
  }
  const inProgress = load.round.status === 'in-progress';
  const header = (
    <View style={styles.head}>
      <ThemedText variant="title" testID="round-check-route">
        Round check — {load.routeName}
      </ThemedText>
      <ThemedText variant="caption" muted>
        Worked out on this device from the readings it holds; no network needed.
      </ThemedText>
    </View>
  );
  if (!roundCheck) {
    return (
      <View style={styles.stack} testID="round-check-screen">
        {header}
        <ThemedText muted testID="round-check-checking">
          Checking the round…
        </ThemedText>
      </View>
    );
  }

  const headline = roundCheckHeadline(roundCheck);
  const flagged = [...roundCheck.retakes, ...roundCheck.elsewhere];
  const selected = flagged.find((i) => i.tag === picked) ?? flagged[0];
  const suspectOf = (tag: string) => roundCheck.suspects.find((s) => s.tag === tag);
  const retake = (i: RetakeItem) =>
    inProgress && i.own && i.stop !== null
      ? () => router.push(`/tech/round/${roundId}?stop=${i.stop}&focus=${encodeURIComponent(i.tag)}`)
      : undefined;
  const dismiss =
    inProgress && actions
      ? (tag: string) => async (reason: string) => {
          try {
            await actions.dismissSuspect(roundId, tag, reason);
            return null;
          } catch (e) {
            return e instanceof Error ? e.message : String(e);
          }
        }
      : null;

  const summary = (
    <Card testID="round-check-headline-card">
      <ThemedText variant="label" bold tone={headline.tone} testID="round-check-headline">
        {headline.text}
      </ThemedText>
      {roundCheck.clean && roundCheck.complete ? (
        <ThemedText testID="round-check-clean" tone="ok" variant="caption">
          ✓ Clean
        </ThemedText>
      ) : null}
      <ThemedText variant="caption" testID="round-check-borrowed">
        {borrowedText(roundCheck)}
      </ThemedText>
      {checking ? (
        <ThemedText variant="caption" muted testID="round-check-checking">
          Checking again…
        </ThemedText>
      ) : null}
    </Card>
  );

  const list = (
    <View style={styles.stack}>
      <View style={styles.section} testID="round-check-retakes">
        <ThemedText variant="title">Re-take before you leave</ThemedText>
        {roundCheck.retakes.length === 0 ? (
          <ThemedText testID="round-check-retakes-none">Nothing to re-take on this route.</ThemedText>
        ) : null}
        {!inProgress && roundCheck.retakes.length ? (
          <ThemedText variant="caption" muted>
            This round is finished: a re-take now goes on the next round of this route.
          </ThemedText>
        ) : null}
        {roundCheck.retakes.map((i) => (
          <RoundCheckRetakeItem
            key={i.tag}
            item={i}
            selected={wide && selected?.tag === i.tag}
            onSelect={wide ? () => setPicked(i.tag) : undefined}
            onRetake={retake(i)}
          />
        ))}
      </View>
      {roundCheck.elsewhere.length ? (
        <View style={styles.section} testID="round-check-elsewhere">
          <ThemedText variant="title">Read on other rounds</ThemedText>
          <ThemedText variant="caption" muted>
            These cannot be re-taken on this round: tell the next round of that route, or the shift lead.
          </ThemedText>
          {roundCheck.elsewhere.map((i) => (
            <RoundCheckRetakeItem
              key={i.tag}
              item={i}
              selected={wide && selected?.tag === i.tag}
              onSelect={wide ? () => setPicked(i.tag) : undefined}
            />
          ))}
        </View>
      ) : null}
    </View>
  );

  const details = wide
    ? selected
      ? [
          <RoundCheckSuspect
            key={selected.tag}
            item={selected}
            suspect={suspectOf(selected.tag)}
            onDismiss={dismiss ? dismiss(selected.tag) : null}
          />,
        ]
      : []
    : flagged.map((i) => (
        <RoundCheckSuspect
          key={i.tag}
          item={i}
          suspect={suspectOf(i.tag)}
          onDismiss={dismiss ? dismiss(i.tag) : null}
        />
      ));

  const notRead = roundCheck.assembled.notRead;
  const byRoute = new Map<string, string[]>();
  for (const n of notRead)
    byRoute.set(n.routeName ?? 'no route', [...(byRoute.get(n.routeName ?? 'no route') ?? []), n.tag]);

  const detail = (
    <View style={styles.stack}>
      {details.length ? (
        <View style={styles.section} testID="round-check-findings">
          <ThemedText variant="title">What the check found</ThemedText>
          {details}
        </View>
      ) : null}
      <Card testID="round-check-balances">
        <ThemedText variant="title">Balances</ThemedText>
        {roundCheck.balances.map((l) => (
          <RoundCheckBalanceLine key={l.equipmentId} line={l} />
        ))}
        {roundCheck.notes.map((n, i) => (
          <ThemedText key={i} variant="label" tone="warning" testID={`round-check-note-${i}`}>
            {n}
          </ThemedText>
        ))}
      </Card>
      {notRead.length ? (
        <Card testID="round-check-missing">
          <ThemedText variant="title">Not read</ThemedText>
          {[...byRoute].map(([route, tags]) => (
            <ThemedText key={route} variant="label" testID={`round-check-missing-${route}`}>
              {route === load.routeName
                ? 'This route, not read yet'
                : `${route}, no reading in the last ${roundCheck.assembled.windowHours} h`}
              : {tags.join(', ')}
            </ThemedText>
          ))}
        </Card>
      ) : null}
      <ThemedText variant="caption" muted testID="round-check-about">
        Checked on this device in{' '}
        <ThemedText variant="caption" muted testID="round-check-ms">
          {ms === null ? '…' : ms.toFixed(0)}
        </ThemedText>{' '}
        ms with cycle model{' '}
        <ThemedText variant="caption" muted testID="round-check-model">
          {roundCheck.modelVersion}
        </ThemedText>
        {roundCheck.modelVersion === load.unitModelVersion
          ? ' (the one the server published)'
          : ` (the server published ${load.unitModelVersion}: sync to update)`}{' '}
        · result{' '}
        <ThemedText variant="caption" muted testID="round-check-fingerprint">
          {roundCheck.fingerprint}
        </ThemedText>
      </ThemedText>
    </View>
  );

  const nav = (
    <View style={styles.nav}>
      <Button
        testID="round-check-back"
        label="Back to the stops"
        kind="plain"
        onPress={() => router.push(`/tech/round/${roundId}`)}
      />
      {inProgress && actions ? (
        <Button
          testID="round-check-finish"
          label="Finish round"
          kind={roundCheck.clean ? 'accent' : 'primary'}
          busy={finishing}
          onPress={async () => {
            setFinishing(true);
            try {
              await actions.finishRound(roundId);
              router.replace('/tech');
            } finally {
              setFinishing(false);
            }
          }}
        />
      ) : (
        <ThemedText variant="caption" muted testID="round-check-finished">
          This round is finished.
        </ThemedText>
      )}
    </View>
  );

  return (
    <View style={styles.stack} testID="round-check-screen">
      {header}
      {summary}
      {wide ? (
        <View style={styles.wideRow}>
          <View style={styles.side}>{list}</View>
          <View style={styles.main}>{detail}</View>
        </View>
      ) : (
        <>
          {list}
          {detail}
        </>
      )}
      {nav}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  head: { gap: space.xxs },
  section: { gap: space.sm },
  nav: { flexDirection: 'row', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap', alignItems: 'center' },
  wideRow: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  side: { width: 360 },
  main: { flex: 1 },
});
