import { Link, useRouter } from 'expo-router';
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { ThemedText } from '@/components/themed-text';
import { space } from '@/constants/theme';
import { useMe } from '@/hooks/queries/me';
import { useSite } from '@/hooks/queries/sites';
import { roleNames } from '@/screens/role-home-screen';
import { useSession } from '@/hooks/session';
import { SITE_ELEVATION_META } from '@/offline/round';
import type { LocalRoute, Store } from '@/offline/store';
import { useOutboxStatus, useStore, useStoreQuery } from '@/offline/use-offline';
import { OthersWaitingNote } from './others-waiting-note';

interface TodayData {
  routes: { route: LocalRoute; stops: number; readings: number; openRoundId: string | null }[];
  finished: { id: string; routeName: string; finishedAt: string }[];
}

async function loadToday(store: Store, siteId: string, userId: string | null): Promise<TodayData> {
  const routes = await store.listRoutes(siteId);
  const open = await store.listRounds({ siteId, status: 'in-progress' });
  const done = await store.listRounds({ siteId, status: 'finished' });
  const versionRoute = async (versionId: string) => (await store.getRouteVersion(versionId))?.routeId ?? null;
  const openByRoute: Record<string, string> = {};
  for (const r of open) {
    // another person's round on this shared device is theirs to carry on, not this person's
    const author = await store.roundAuthor(r.id);
    if (author && author.id !== userId) continue;
    const rid = await versionRoute(r.routeVersionId);
    if (rid && !openByRoute[rid]) openByRoute[rid] = r.id;
  }
  const names = Object.fromEntries(routes.map((r) => [r.id, r.name]));
  const finished = [];
  for (const r of done.slice(0, 5)) {
    const rid = await versionRoute(r.routeVersionId);
    finished.push({ id: r.id, routeName: (rid && names[rid]) || 'Route', finishedAt: r.finishedAt ?? r.startedAt });
  }
  return {
    routes: routes.map((route) => ({
      route,
      stops: route.version.template.stops.length,
      readings: route.version.template.stops.reduce((n, s) => n + s.readings.length, 0),
      openRoundId: openByRoute[route.id] ?? null,
    })),
    finished,
  };
}

function time(iso: string | null): string {
  if (!iso) return 'never';
  const d = new Date(iso);
  return `${d.toLocaleDateString()} ${d.toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}`;
}

/** The technician's start: the site's routes on this device, rounds under way, what waits to sync. */
export function TodayScreen() {
  const { membership, user } = useSession();
  const siteId = membership?.siteId ?? '';
  const { store, actions, state, error } = useStore();
  const site = useSite(siteId || undefined);
  const status = useOutboxStatus();
  const me = useMe();
  const router = useRouter();
  const [busy, setBusy] = useState<string | null>(null);
  const { data } = useStoreQuery((s) => loadToday(s, siteId, user?.id ?? null), `${siteId}|${user?.id ?? ''}`);

  // Keep the site's elevation on the device: gauge pressures need a barometric pressure offline.
  useEffect(() => {
    if (store && site.data) void store.setMeta(SITE_ELEVATION_META(site.data.id), String(site.data.elevationM));
  }, [store, site.data]);

  if (state === 'locked' || state === 'error') {
    return (
      <ThemedText tone="danger" testID="store-error">
        {error?.message}
      </ThemedText>
    );
  }

  return (
    <View style={styles.stack}>
      <View style={styles.who} testID="today-who">
        <ThemedText variant="label" bold testID="home-name">
          {me.data?.name ?? user?.name}
        </ThemedText>
        <ThemedText variant="label" muted>
          ·
        </ThemedText>
        <ThemedText variant="label" testID="home-role">
          {roleNames[me.data?.memberships.find((m) => m.siteId === siteId)?.role ?? 'technician']}
        </ThemedText>
        <ThemedText variant="label" muted>
          ·
        </ThemedText>
        <ThemedText variant="label" testID="home-site">
          {site.data?.name ?? membership?.siteName}
        </ThemedText>
      </View>
      <Card testID="sync-card">
        <ThemedText variant="label" testID="sync-summary">
          {status
            ? `${status.waiting} waiting to send · ${status.photosWaiting} photos waiting · last sync ${time(status.lastSyncAt)}`
            : 'Opening the device store…'}
        </ThemedText>
        {status && status.refused > 0 ? (
          <ThemedText tone="danger" testID="sync-refused">
            {status.refused} refused by the server — see the outbox.
          </ThemedText>
        ) : null}
        <OthersWaitingNote status={status} />
        <Link href="/tech/outbox" testID="open-outbox">
          <ThemedText variant="label" bold tone="accent">
            Open the outbox
          </ThemedText>
        </Link>
      </Card>
      <ThemedText variant="title">Routes</ThemedText>
      {data && data.routes.length === 0 ? (
        <ThemedText muted testID="no-routes">
          No routes on this device yet. Connect once to load the site&apos;s routes; after that the rounds work without
          a network.
        </ThemedText>
      ) : null}
      {data?.routes.map(({ route, stops, readings, openRoundId }) => (
        <Card key={route.id} testID={`route-${route.version.template.id}`}>
          <ThemedText variant="title">{route.name}</ThemedText>
          <ThemedText variant="caption" muted>
            {stops} stops · {readings} readings · version {route.version.number}
          </ThemedText>
          <Button
            testID={`route-${route.version.template.id}-${openRoundId ? 'resume' : 'begin'}`}
            label={openRoundId ? 'Carry on with this round' : 'Begin a round'}
            kind={openRoundId ? 'accent' : 'primary'}
            busy={busy === route.id}
            onPress={async () => {
              if (openRoundId) return router.push(`/tech/round/${openRoundId}`);
              if (!actions) return;
              setBusy(route.id);
              try {
                const r = await actions.startRound(route.version.id);
                router.push(`/tech/round/${r.id}`);
              } finally {
                setBusy(null);
              }
            }}
          />
        </Card>
      ))}
      {data && data.finished.length ? (
        <>
          <ThemedText variant="title">Finished on this device</ThemedText>
          {data.finished.map((f) => (
            <ThemedText key={f.id} testID={`finished-${f.id}`}>
              {f.routeName} — {time(f.finishedAt)}
            </ThemedText>
          ))}
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  who: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
});
