/**
 * The round check on the device: reads the inputs from the device store (offline/round-check.ts),
 * runs shared/round-check's checkRound on them — no network — and runs it again whenever they change
 * (a re-take, a dismissal, another round finished on the device). The device keeps what the last
 * check used and found (model version, result fingerprint, the readings) in its store's meta.
 *
 * The check runs off the tap that asked for it (lib/round-check-runner: a Web Worker on the web, a
 * zero-delay timer elsewhere); its duration is measured, shown and written as a User Timing
 * measure.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { isoTime } from '@/offline/ids';
import {
  loadRoundCheckInput,
  ROUND_CHECK_META,
  type DeviceRoundCheckLoad,
  type RoundCheckRecord,
} from '@/offline/round-check';
import { useStore, useStoreQuery } from '@/offline/use-offline';
import type { RoundCheck } from '@/shared/round-check';
import { runRoundCheck, type RoundCheckRun } from '../lib/round-check-runner';

export interface RoundCheckState {
  /** the inputs as read from the store (or why they cannot be) */
  load: DeviceRoundCheckLoad | undefined;
  roundCheck: RoundCheck | null;
  /** the check's duration on this device (asked → answered), ms */
  ms: number | null;
  /** where it ran: the page's thread or a Web Worker */
  where: RoundCheckRun['where'] | null;
  checking: boolean;
  error: Error | null;
}

type Ready = Extract<DeviceRoundCheckLoad, { ok: true }>;

/** What the check depends on: readings used (by id), dismissals, model, barometric pressure. */
export function roundCheckKey(load: Ready): string {
  const i = load.input;
  return JSON.stringify([
    i.round.id,
    i.model.version,
    i.round.barometricPa,
    i.round.status,
    i.round.readings.map((r) => r.id),
    i.others.map((o) => [o.id, o.readings.map((r) => r.id)]),
    i.dismissals ?? [],
  ]);
}

/** User Timing entry of each check, for the browser tests and benches */
export const ROUND_CHECK_MEASURE = 'trueround:round-check';

/** The last few checks by their inputs: a screen that mounts again (a layout change) shows them at once. */
const recent = new Map<string, RoundCheckRun>();
function remember(key: string, run: RoundCheckRun) {
  recent.delete(key);
  recent.set(key, run);
  while (recent.size > 4) recent.delete(recent.keys().next().value!);
}

export function useRoundCheck(roundId: string): RoundCheckState {
  const { store } = useStore();
  const { data: load, error } = useStoreQuery((s) => loadRoundCheckInput(s, roundId), roundId);
  const key = useMemo(() => (load && load.ok ? roundCheckKey(load) : null), [load]);
  const [done, setDone] = useState<{ key: string; run: RoundCheckRun } | null>(null);
  const [failure, setFailure] = useState<Error | null>(null);
  const doneKey = done?.key ?? null;
  // one check in flight per key: a store change that leaves the inputs as they were does not restart it
  const inFlight = useRef<string | null>(null);
  const latest = useRef<string | null>(null);
  latest.current = key;
  const mounted = useRef(true);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);

  useEffect(() => {
    if (!load || !load.ok || key === null || doneKey === key || inFlight.current === key) return;
    const cached = recent.get(key);
    if (cached) {
      setDone({ key, run: cached });
      return;
    }
    inFlight.current = key;
    const started = performance.now();
    runRoundCheck(load.input).then(
      (run) => {
        if (inFlight.current === key) inFlight.current = null;
        if (!mounted.current || latest.current !== key) return;
        performance.measure?.(ROUND_CHECK_MEASURE, {
          start: started,
          end: started + run.ms,
          detail: { where: run.where, roundId },
        });
        remember(key, run);
        setDone({ key, run });
        setFailure(null);
        const roundCheck = run.roundCheck;
        if (store) {
          const record: RoundCheckRecord = {
            modelVersion: roundCheck.modelVersion,
            fingerprint: roundCheck.fingerprint,
            checkedAt: isoTime(Date.now()),
            readings: Object.fromEntries(
              Object.entries(roundCheck.assembled.sources).map(([t, s]) => [t, s.readingId]),
            ),
            retakes: roundCheck.retakes.map((r) => r.tag),
            ms: run.ms,
          };
          void store.setMeta(ROUND_CHECK_META(roundId), JSON.stringify(record));
        }
      },
      (e: unknown) => {
        if (inFlight.current === key) inFlight.current = null;
        if (mounted.current && latest.current === key) setFailure(e instanceof Error ? e : new Error(String(e)));
      },
    );
  }, [key, doneKey, load, store, roundId]);

  const current = done && done.key === key ? done : null;
  return {
    load,
    roundCheck: current?.run.roundCheck ?? done?.run.roundCheck ?? null,
    ms: current?.run.ms ?? null,
    where: current?.run.where ?? null,
    checking: !!load && load.ok && !current && !failure,
    error: error ?? failure,
  };
}
