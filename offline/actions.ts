/**
 * What the technician does on a round, as device actions. Each action checks its input, then
 * writes its record AND its outbox row in ONE local transaction: either both are there or
 * neither. Ids are UUIDs made on the device (the injected IdSource); device time is recorded as
 * data (the injected Clock), never used to order anything.
 *
 * Every action takes an optional `id`: calling it again with the same id (a double tap, a retry
 * after a crash) returns the record already there and writes nothing.
 */
import type { z } from 'zod';
import {
  CheckAnswerValue,
  Dismissal,
  MAX_ANNOUNCED_PHOTO_BYTES,
  PHOTO_MIMES,
  PushCheckAnswer,
  PushPhoto,
  PushReading,
  PushRound,
  type PhotoMime,
  type ReadingFlag,
} from '@/shared/api/sync';
import { effectiveModel, validateModel } from '@/shared/cycle';
import { isoTime, type Clock, type IdSource } from './ids';
import type { LocalDbOps } from './local-db';
import type { OutboxKind, OutboxPayloadOf } from './schemas';
import type { LocalCheckAnswer, LocalPhoto, LocalReading, LocalRound, LocalRouteVersion, Store } from './store';

/** Bad input to an action: names the field, the value and what was expected. */
export class ActionError extends Error {
  readonly code = 'bad_input';
  constructor(
    public readonly field: string,
    public readonly value: unknown,
    message: string,
  ) {
    super(`${field}: ${message} (got ${show(value)})`);
    this.name = 'ActionError';
  }
}

function show(v: unknown): string {
  if (v instanceof Uint8Array) return `${v.length} bytes`;
  try {
    const s = JSON.stringify(v);
    if (s === undefined) return String(v);
    return s.length > 80 ? s.slice(0, 77) + '…' : s;
  } catch {
    return String(v);
  }
}

export interface ActionDeps {
  store: Store;
  ids: IdSource;
  clock: Clock;
  /** Lower-case hex SHA-256 of the bytes; defaults to Web Crypto (`crypto.subtle`). */
  sha256?: (bytes: Uint8Array) => Promise<string>;
  /**
   * Who is signed in: every record and outbox row carries them as its author, and is pushed only
   * while they are signed in (./sync.ts). Null: nobody (the actions refuse). Omitted: no author
   * is kept (tests of the store alone).
   */
  author?: () => Author | null;
}

/** The person who made a record on this device. */
export interface Author {
  id: string;
  name: string;
}

export interface RecordReadingInput {
  roundId: string;
  instrumentTag: string;
  /** The number as typed, in `unit`; null for a skipped reading (then `skipReason`). */
  valueTyped: number | null;
  unit: string;
  reference?: 'absolute' | 'gauge' | 'vacuum' | null;
  note?: string | null;
  skipReason?: string | null;
  /** The technician re-read and kept the value after the phone flagged it. */
  confirmedAfterFlag?: boolean;
  /** What the phone's spot checks raised (shared/checks), as wire flags. */
  flags?: ReadingFlag[];
  /** The id of the reading this one corrects or re-takes. */
  supersedes?: string | null;
  id?: string;
}

export interface AnswerCheckInput {
  roundId: string;
  checkId: string;
  answer: z.input<typeof CheckAnswerValue>;
  note?: string | null;
  id?: string;
}

export interface AttachPhotoInput {
  roundId: string;
  readingId?: string | null;
  checkId?: string | null;
  bytes: Uint8Array;
  mime: string;
  id?: string;
}

export interface DismissOptions {
  /** The flag dismissed; "suspect" (the server named the instrument suspect) unless said. */
  flag?: string;
  /** The reading it was raised on; by default the tag's current reading on the round, if any. */
  readingId?: string;
  id?: string;
}

export interface Actions {
  startRound(routeVersionId: string, opts?: { id?: string }): Promise<LocalRound>;
  recordReading(input: RecordReadingInput): Promise<LocalReading>;
  answerCheck(input: AnswerCheckInput): Promise<LocalCheckAnswer>;
  attachPhoto(input: AttachPhotoInput): Promise<LocalPhoto>;
  finishRound(roundId: string): Promise<LocalRound>;
  dismissSuspect(roundId: string, tag: string, reason: string, opts?: DismissOptions): Promise<LocalRound>;
}

/** Parses with a wire schema; the first issue becomes an ActionError naming the field. */
function wire<S extends z.ZodType>(schema: S, value: unknown, prefix = ''): z.output<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const issue = r.error.issues[0];
  let at: unknown = value;
  for (const k of issue.path) at = (at as Record<PropertyKey, unknown> | undefined)?.[k as PropertyKey];
  const field = prefix + (issue.path.length ? issue.path.join('.') : '(input)');
  throw new ActionError(field, at, issue.message);
}

async function webCryptoSha256(bytes: Uint8Array): Promise<string> {
  const subtle = (
    globalThis as { crypto?: { subtle?: { digest(alg: string, data: Uint8Array): Promise<ArrayBuffer> } } }
  ).crypto?.subtle;
  if (!subtle) throw new Error('No SHA-256 available: pass ActionDeps.sha256 (expo-crypto digest in the app)');
  return toHex(new Uint8Array(await subtle.digest('SHA-256', bytes)));
}

export function toHex(bytes: Uint8Array): string {
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

export function createActions(deps: ActionDeps): Actions {
  const { store, ids, clock } = deps;
  const sha256 = deps.sha256 ?? webCryptoSha256;
  const now = () => isoTime(clock.now());
  const newId = (given?: string) => {
    if (given !== undefined) return wire(PushRound.shape.id, given, 'id: ');
    return ids.uuid();
  };

  /** The signed-in author, or undefined when this store keeps no authors; refuses when nobody is signed in. */
  const author = (): Author | undefined => {
    if (!deps.author) return undefined;
    const a = deps.author();
    if (!a) throw new ActionError('author', null, 'nobody is signed in on this device; sign in to record');
    return a;
  };

  async function enqueue<K extends OutboxKind>(tx: LocalDbOps, kind: K, recordId: string, payload: OutboxPayloadOf<K>) {
    const a = author();
    await tx.run(
      'INSERT INTO outbox (kind, record_id, payload, created_at, author_id, author_name) VALUES (?, ?, ?, ?, ?, ?)',
      [kind, recordId, JSON.stringify(payload), now(), a?.id ?? null, a?.name ?? null],
    );
  }

  /** A round on this device is added to only by the person who started it (the server would refuse anyone else). */
  async function assertAuthorOf(tx: LocalDbOps, roundId: string) {
    const a = author();
    if (!a) return;
    const row = await tx.first<{ author_id: string | null; author_name: string | null }>(
      'SELECT author_id, author_name FROM rounds WHERE id = ?',
      [roundId],
    );
    if (row?.author_id && row.author_id !== a.id) {
      throw new ActionError(
        'roundId',
        roundId,
        `this round was started by ${row.author_name ?? 'another person'} on this device; only they add to it`,
      );
    }
  }

  async function roundPayload(tx: LocalDbOps, roundId: string): Promise<OutboxPayloadOf<'round'>> {
    const r = await store.getRound(roundId, tx);
    if (!r) throw new ActionError('roundId', roundId, 'no such round on this device');
    // The cycle model this device holds for the round's unit: its checks and roundCheck use it, and
    // the server says so on the round when its own model differs.
    const version = await store.getRouteVersion(r.routeVersionId, tx);
    const route = version ? await store.getRoute(version.routeId, tx) : null;
    const unit = route ? await store.getUnit(route.unitId, tx) : null;
    // the effective version: the model with this device's instrument rows (shared/cycle/instrument-master)
    const parsed = unit ? validateModel(unit.model) : null;
    const modelVersion =
      unit && parsed?.ok ? effectiveModel(parsed.model, await store.listInstruments(unit.id, tx)).version : undefined;
    return wire(PushRound, {
      id: r.id,
      routeVersionId: r.routeVersionId,
      startedAt: r.startedAt,
      finishedAt: r.finishedAt,
      status: r.status,
      dismissals: r.dismissals.map(({ id: _id, ...d }) => d),
      ...(modelVersion ? { modelVersion } : {}),
    });
  }

  async function openRound(
    tx: LocalDbOps,
    roundId: string,
  ): Promise<{ round: LocalRound; version: LocalRouteVersion; unitId: string }> {
    const round = await store.getRound(roundId, tx);
    if (!round) throw new ActionError('roundId', roundId, 'no such round on this device');
    await assertAuthorOf(tx, roundId);
    if (round.status !== 'in-progress')
      throw new ActionError('roundId', roundId, 'this round is finished; start a new round to record more');
    const version = await store.getRouteVersion(round.routeVersionId, tx);
    if (!version)
      throw new ActionError(
        'roundId',
        roundId,
        `the round's route version ${round.routeVersionId} is missing or damaged on this device`,
      );
    const route = await store.getRoute(version.routeId, tx);
    if (!route)
      throw new ActionError(
        'roundId',
        roundId,
        `the round's route ${version.routeId} is missing or damaged on this device`,
      );
    return { round, version, unitId: route.unitId };
  }

  const done = <T>(v: T): T => {
    store.notifyChange();
    return v;
  };

  return {
    async startRound(routeVersionId, opts = {}) {
      const id = newId(opts.id);
      const round = await store.db.transaction(async (tx) => {
        const existing = await store.getRound(id, tx);
        if (existing) {
          if (existing.routeVersionId !== routeVersionId)
            throw new ActionError('id', id, `already used by a round of route version ${existing.routeVersionId}`);
          return existing;
        }
        const version = await store.getRouteVersion(routeVersionId, tx);
        if (!version)
          throw new ActionError(
            'routeVersionId',
            routeVersionId,
            'no such route version on this device; pull reference data first',
          );
        const payload = wire(PushRound, {
          id,
          routeVersionId,
          startedAt: now(),
          finishedAt: null,
          status: 'in-progress',
          dismissals: [],
        });
        const a = author();
        await tx.run(
          `INSERT INTO rounds (id, route_version_id, status, started_at, finished_at, author_id, author_name) VALUES (?, ?, 'in-progress', ?, NULL, ?, ?)`,
          [id, routeVersionId, payload.startedAt, a?.id ?? null, a?.name ?? null],
        );
        await enqueue(tx, 'round', id, payload);
        return (await store.getRound(id, tx))!;
      });
      return done(round);
    },

    async recordReading(input) {
      const id = newId(input.id);
      const reading = await store.db.transaction(async (tx) => {
        const existing = await store.getReading(id, tx);
        if (existing) {
          if (existing.roundId !== input.roundId)
            throw new ActionError('id', id, `already used by a reading of round ${existing.roundId}`);
          return existing;
        }
        const { unitId } = await openRound(tx, input.roundId);
        const instrument = await store.instrumentByTag(unitId, input.instrumentTag, tx);
        if (!instrument) {
          throw new ActionError(
            'instrumentTag',
            input.instrumentTag,
            "no instrument with this tag on the round's unit; pull reference data first",
          );
        }
        if (input.supersedes) {
          const old = await store.getReading(input.supersedes, tx);
          if (!old || old.roundId !== input.roundId)
            throw new ActionError('supersedes', input.supersedes, 'no such reading on this round');
          if (old.instrumentId !== instrument.id) {
            throw new ActionError(
              'supersedes',
              input.supersedes,
              `that reading is of ${old.tag}, not ${input.instrumentTag}`,
            );
          }
          if (old.supersededBy) {
            throw new ActionError(
              'supersedes',
              input.supersedes,
              `already superseded by ${old.supersededBy}; supersede the current reading`,
            );
          }
        }
        const payload = wire(PushReading, {
          id,
          roundId: input.roundId,
          instrumentId: instrument.id,
          valueTyped: input.valueTyped,
          unit: input.unit,
          reference: input.reference ?? null,
          deviceTime: now(),
          note: input.note ?? null,
          skipReason: input.skipReason ?? null,
          supersedes: input.supersedes ?? null,
          confirmedAfterFlag: input.confirmedAfterFlag ?? false,
          flags: input.flags ?? [],
        });
        await tx.run(
          `INSERT INTO readings (id, round_id, instrument_id, tag, value_typed, unit, reference, device_time, note, skip_reason, supersedes, flags_json, confirmed_after_flag)
           VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
          [
            id,
            payload.roundId,
            payload.instrumentId,
            instrument.tag,
            payload.valueTyped,
            payload.unit,
            payload.reference ?? null,
            payload.deviceTime,
            payload.note ?? null,
            payload.skipReason ?? null,
            payload.supersedes ?? null,
            JSON.stringify(payload.flags),
            payload.confirmedAfterFlag ? 1 : 0,
          ],
        );
        await enqueue(tx, 'reading', id, payload);
        return (await store.getReading(id, tx))!;
      });
      return done(reading);
    },

    async answerCheck(input) {
      const id = newId(input.id);
      const answer = await store.db.transaction(async (tx) => {
        const existing = await tx.first<{ round_id: string }>('SELECT round_id FROM check_answers WHERE id = ?', [id]);
        if (existing) {
          if (existing.round_id !== input.roundId)
            throw new ActionError('id', id, `already used by an answer of round ${existing.round_id}`);
        } else {
          const { version } = await openRound(tx, input.roundId);
          const check = version.template.stops.flatMap((s) => s.checks).find((c) => c.id === input.checkId);
          if (!check)
            throw new ActionError('checkId', input.checkId, `no such check on route version ${version.number}`);
          const value = wire(CheckAnswerValue, input.answer, 'answer.');
          if (value.kind !== check.kind)
            throw new ActionError('answer.kind', value.kind, `check "${check.id}" takes a ${check.kind} answer`);
          if (check.kind === 'choice' && !check.options.includes(value.value as string)) {
            throw new ActionError(
              'answer.value',
              value.value,
              `must be one of ${check.options.map((o) => JSON.stringify(o)).join(', ')}`,
            );
          }
          const payload = wire(PushCheckAnswer, {
            id,
            roundId: input.roundId,
            checkId: input.checkId,
            answer: value,
            note: input.note ?? null,
            deviceTime: now(),
          });
          await tx.run(
            'INSERT INTO check_answers (id, round_id, check_id, answer_json, note, device_time) VALUES (?, ?, ?, ?, ?, ?)',
            [
              id,
              payload.roundId,
              payload.checkId,
              JSON.stringify(payload.answer),
              payload.note ?? null,
              payload.deviceTime,
            ],
          );
          await enqueue(tx, 'checkAnswer', id, payload);
        }
        const row = await tx.first<{
          seq: number;
          id: string;
          round_id: string;
          check_id: string;
          answer_json: string;
          note: string | null;
          device_time: string;
        }>('SELECT * FROM check_answers WHERE id = ?', [id]);
        const parsed = store.parseJson(CheckAnswerValue, row!.answer_json, {
          table: 'check_answers',
          id,
          column: 'answer_json',
        });
        if (!parsed) throw new Error(`check answer ${id} is damaged on this device`);
        return {
          seq: Number(row!.seq),
          id,
          roundId: row!.round_id,
          checkId: row!.check_id,
          answer: parsed,
          note: row!.note,
          deviceTime: row!.device_time,
        };
      });
      return done(answer);
    },

    async attachPhoto(input) {
      const id = newId(input.id);
      if (!(input.bytes instanceof Uint8Array))
        throw new ActionError('bytes', input.bytes, 'must be the image bytes (Uint8Array)');
      if (input.bytes.length < 1) throw new ActionError('bytes', input.bytes, 'the photo is empty');
      if (input.bytes.length > MAX_ANNOUNCED_PHOTO_BYTES) {
        throw new ActionError('bytes', input.bytes, `a photo may be at most ${MAX_ANNOUNCED_PHOTO_BYTES} bytes`);
      }
      if (!(PHOTO_MIMES as readonly string[]).includes(input.mime)) {
        throw new ActionError('mime', input.mime, `must be one of ${PHOTO_MIMES.join(', ')}`);
      }
      // Hash outside the transaction: it is pure, and the transaction stays short.
      const digest = await sha256(input.bytes);
      const photo = await store.db.transaction(async (tx) => {
        const existing = await store.getPhoto(id, tx);
        if (!existing) {
          const { version } = await openRound(tx, input.roundId);
          if (input.readingId) {
            const r = await store.getReading(input.readingId, tx);
            if (!r || r.roundId !== input.roundId)
              throw new ActionError('readingId', input.readingId, 'no such reading on this round');
          }
          if (input.checkId && !version.template.stops.some((s) => s.checks.some((c) => c.id === input.checkId))) {
            throw new ActionError('checkId', input.checkId, `no such check on route version ${version.number}`);
          }
          const payload = wire(PushPhoto, {
            id,
            roundId: input.roundId,
            readingId: input.readingId ?? null,
            checkId: input.checkId ?? null,
            sha256: digest,
            mime: input.mime as PhotoMime,
            bytes: input.bytes.length,
          });
          await tx.run(
            `INSERT INTO photos (id, round_id, reading_id, check_id, mime, sha256, byte_size, data, device_time, author_id)
             VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
            [
              id,
              payload.roundId,
              payload.readingId ?? null,
              payload.checkId ?? null,
              payload.mime,
              payload.sha256,
              payload.bytes,
              input.bytes,
              now(),
              author()?.id ?? null,
            ],
          );
          await enqueue(tx, 'photo', id, payload);
        }
        return id;
      });
      const stored = await store.getPhoto(photo);
      if (!stored) throw new Error(`photo ${photo} vanished after it was recorded`);
      if (stored.roundId !== input.roundId)
        throw new ActionError('id', id, `already used by a photo of round ${stored.roundId}`);
      return done(stored);
    },

    async finishRound(roundId) {
      const round = await store.db.transaction(async (tx) => {
        const r = await store.getRound(roundId, tx);
        if (!r) throw new ActionError('roundId', roundId, 'no such round on this device');
        if (r.status === 'finished') return r;
        await assertAuthorOf(tx, roundId);
        await tx.run(`UPDATE rounds SET status = 'finished', finished_at = ? WHERE id = ?`, [now(), roundId]);
        await enqueue(tx, 'round', roundId, await roundPayload(tx, roundId));
        return (await store.getRound(roundId, tx))!;
      });
      return done(round);
    },

    async dismissSuspect(roundId, tag, reason, opts = {}) {
      const id = newId(opts.id);
      const round = await store.db.transaction(async (tx) => {
        const existing = await tx.first<{ round_id: string }>('SELECT round_id FROM dismissals WHERE id = ?', [id]);
        if (existing) {
          if (existing.round_id !== roundId)
            throw new ActionError('id', id, `already used by a dismissal on round ${existing.round_id}`);
          return (await store.getRound(roundId, tx))!;
        }
        const { unitId } = await openRound(tx, roundId);
        if (!reason || !reason.trim()) throw new ActionError('reason', reason, 'say why the flag is dismissed');
        const instrument = await store.instrumentByTag(unitId, tag, tx);
        if (!instrument) throw new ActionError('tag', tag, "no instrument with this tag on the round's unit");
        let readingId = opts.readingId;
        if (readingId) {
          const r = await store.getReading(readingId, tx);
          if (!r || r.roundId !== roundId)
            throw new ActionError('readingId', readingId, 'no such reading on this round');
        } else {
          const cur = await tx.first<{ id: string }>(
            `SELECT r.id FROM readings r WHERE r.round_id = ? AND r.instrument_id = ?
             AND NOT EXISTS (SELECT 1 FROM readings s WHERE s.supersedes = r.id) ORDER BY r.seq DESC LIMIT 1`,
            [roundId, instrument.id],
          );
          readingId = cur?.id;
        }
        const d = wire(Dismissal, {
          readingId,
          tag,
          flag: opts.flag ?? 'suspect',
          note: reason.trim(),
          deviceTime: now(),
        });
        await tx.run(
          'INSERT INTO dismissals (id, round_id, reading_id, tag, flag, note, device_time) VALUES (?, ?, ?, ?, ?, ?, ?)',
          [id, roundId, d.readingId ?? null, d.tag ?? null, d.flag, d.note ?? null, d.deviceTime],
        );
        await enqueue(tx, 'round', roundId, await roundPayload(tx, roundId));
        return (await store.getRound(roundId, tx))!;
      });
      return done(round);
    },
  };
}
