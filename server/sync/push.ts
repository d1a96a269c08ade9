/**
 * pushBatch: applies one batch of the device's outbox in one transaction.
 *
 *  1. Which rounds the batch touches: its own rounds, and stored rounds its readings, answers and
 *     photos point at. A stored round keeps what it has (a replay that changes it is ignored); only
 *     in-progress → finished moves it on.
 *  2. Authorisation: a new round needs a push role on its route's site; a stored round is written
 *     by its technician or a site admin. Else 403, nothing stored.
 *  3. Validation of every new item against the stored reference data: route version, instrument of
 *     the round's unit, unit of the instrument's quantity, pressure reference, SI conversion,
 *     superseded reading, check of the round's template, photo's reading. Every problem is listed
 *     (400 `validation`, details[].path like `readings.3.unit`) and nothing of the batch is stored.
 *  4. Inserts with `on conflict (id) do nothing`: ids already there count as duplicates.
 *
 * Ids that point at stored records (a round, a route version, an instrument, a superseded reading,
 * a photo's reading) are looked up only on the caller's own sites: a record of another site gets
 * the very answer an unknown id gets, so a push cannot tell whether an id exists elsewhere. The
 * one exception is a round id itself that another site already holds (ids are made on the device,
 * so only someone who knows it can send it): it cannot be stored, and answers the 403 a round of
 * another technician gets. A re-take (`supersedes`) names a reading of the same round only; the
 * round is written by its technician or a site admin, and each reading keeps who pushed it
 * (`recorded_by`), so an admin's re-take is recorded as the admin's.
 *
 * Readings are stored as typed (value, unit in its canonical spelling, reference) and in SI. Gauge
 * and vacuum pressures refer to the round's barometric pressure: the latest barometer reading of
 * the round (in this batch, else stored), else the site's elevation through the ICAO standard
 * atmosphere (shared/units barometricFromElevation).
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { Role } from '../../shared/api/auth';
import type { PushBatch, PushCounts, PushReading, PushResponse } from '../../shared/api/sync';
import { checksById } from '../../checklists/validate';
import type { RouteTemplate } from '../../shared/route/template';
import {
  barometricFromElevation,
  resolveUnit,
  siteBarometricPa,
  toSI,
  UnitError,
  type Quantity,
  type UnitErrorCode,
} from '../../shared/units';
import type { ValidationIssue } from '../../shared/api/errors';
import { InstrumentEntity, type Instrument } from '../entities';
import { AppError } from '../errors';
import { assertMayPush, mayWriteRound } from './access';

export interface PushOutcome {
  response: PushResponse;
  /** Rounds that got anything new from this push (for the analysis hook). */
  roundIds: string[];
}

interface VersionRow {
  id: string;
  template: RouteTemplate;
  site_id: string;
  unit_id: string;
  elevation_m: number;
}

interface StoredRound {
  id: string;
  site_id: string;
  route_version_id: string;
  technician_id: string;
  status: 'in-progress' | 'finished';
}

interface RoundCtx {
  id: string;
  siteId: string;
  version: VersionRow;
  stored: boolean;
}

/** Which field of a reading a shared/units refusal is about. */
const FIELD_OF_UNIT_ERROR: Record<UnitErrorCode, 'unit' | 'reference' | 'valueTyped'> = {
  empty: 'unit',
  badNumber: 'valueTyped',
  notFinite: 'valueTyped',
  unknownUnit: 'unit',
  wrongQuantity: 'unit',
  missingReference: 'reference',
  badReference: 'reference',
  missingBarometric: 'valueTyped',
  badBarometric: 'valueTyped',
  nonPositiveAbsolute: 'valueTyped',
  outOfRange: 'valueTyped',
  incompatibleUnits: 'unit',
};

const INSERT_CHUNK = 500;

/** `insert … values (…), (…) on conflict (id) do nothing returning <returning>` in chunks. */
async function insertIgnoring(
  em: EntityManager,
  table: string,
  columns: string[],
  rows: unknown[][],
  returning: string,
): Promise<Record<string, string>[]> {
  const out: Record<string, string>[] = [];
  for (let i = 0; i < rows.length; i += INSERT_CHUNK) {
    const chunk = rows.slice(i, i + INSERT_CHUNK);
    const params: unknown[] = [];
    const tuples = chunk.map((row) => `(${row.map((v) => `$${params.push(v)}`).join(', ')})`);
    const sql =
      `INSERT INTO "${table}" (${columns.map((c) => `"${c}"`).join(', ')}) VALUES ${tuples.join(', ')} ` +
      `ON CONFLICT ("id") DO NOTHING RETURNING ${returning}`;
    out.push(...((await em.query(sql, params)) as Record<string, string>[]));
  }
  return out;
}

/** First occurrence of each id, with its index in the batch. */
function firstById<T extends { id: string }>(items: T[]): { item: T; index: number }[] {
  const seen = new Set<string>();
  const out: { item: T; index: number }[] = [];
  items.forEach((item, index) => {
    if (seen.has(item.id)) return;
    seen.add(item.id);
    out.push({ item, index });
  });
  return out;
}

async function existingIds(em: EntityManager, table: string, ids: string[]): Promise<Set<string>> {
  if (ids.length === 0) return new Set();
  const rows = (await em.query(`SELECT "id" FROM "${table}" WHERE "id" = ANY($1::uuid[])`, [ids])) as { id: string }[];
  return new Set(rows.map((r) => r.id));
}

/** A uuid no site has, for an `IN` list that would otherwise be empty. */
const NO_SITE = '00000000-0000-0000-0000-000000000000';

/** The 403 for a stored round the caller may not write: another technician's, or another site's. */
const roundNotYours = (roundId: string) =>
  new AppError(
    403,
    'forbidden',
    `Round ${roundId} cannot take this push: only the technician who recorded it, or an admin of its site, adds to it`,
  );

/** Stored readings among `ids` whose rounds are on `siteIds` (readings elsewhere are left out, as if unknown). */
async function storedReadingsOn(
  em: EntityManager,
  siteIds: string[],
  ids: (string | null | undefined)[],
): Promise<Map<string, { round_id: string; instrument_id: string }>> {
  const wanted = [...new Set(ids.filter((x): x is string => !!x))];
  if (wanted.length === 0 || siteIds.length === 0) return new Map();
  const rows = (await em.query(
    `SELECT x."id", x."round_id", x."instrument_id" FROM "readings" x JOIN "rounds" r ON r."id" = x."round_id"
      WHERE x."id" = ANY($1::uuid[]) AND r."site_id" = ANY($2::uuid[])`,
    [wanted, siteIds],
  )) as { id: string; round_id: string; instrument_id: string }[];
  return new Map(rows.map((r) => [r.id, r]));
}

const zero = (): PushCounts => ({ rounds: 0, readings: 0, checkAnswers: 0, photos: 0 });

export async function pushBatch(
  ds: DataSource,
  userId: string,
  batch: PushBatch,
  receivedAt = new Date(),
): Promise<PushOutcome> {
  const skewMs = receivedAt.getTime() - Date.parse(batch.sentAt);

  return ds.transaction(async (em) => {
    const issues: ValidationIssue[] = [];
    const issue = (path: string, message: string) => issues.push({ path, message });

    // 1. rounds in play ----------------------------------------------------------------------
    const referenced = new Set<string>([
      ...batch.rounds.map((r) => r.id),
      ...batch.readings.map((r) => r.roundId),
      ...batch.checkAnswers.map((a) => a.roundId),
      ...batch.photos.map((p) => p.roundId),
    ]);
    const storedRounds = new Map<string, StoredRound>();
    if (referenced.size) {
      const rows = (await em.query(
        `SELECT "id", "site_id", "route_version_id", "technician_id", "status" FROM "rounds" WHERE "id" = ANY($1::uuid[])`,
        [[...referenced]],
      )) as StoredRound[];
      for (const r of rows) storedRounds.set(r.id, r);
    }

    // Every site the caller is a member of, with the role: records elsewhere do not exist for this push.
    const roles: Map<string, Role> = new Map(
      (
        (await em.query(`SELECT "site_id", "role" FROM "memberships" WHERE "user_id" = $1`, [userId])) as {
          site_id: string;
          role: Role;
        }[]
      ).map((m) => [m.site_id, m.role]),
    );
    const batchRoundIds = new Set(batch.rounds.map((r) => r.id));
    for (const s of [...storedRounds.values()]) {
      if (roles.has(s.site_id)) continue;
      if (batchRoundIds.has(s.id)) throw roundNotYours(s.id);
      storedRounds.delete(s.id); // only pointed at by readings, answers or photos: as if unknown
    }

    const versionIds = new Set<string>([
      ...batch.rounds.filter((r) => !storedRounds.has(r.id)).map((r) => r.routeVersionId),
      ...[...storedRounds.values()].map((r) => r.route_version_id),
    ]);
    const versions = new Map<string, VersionRow>();
    if (versionIds.size) {
      const rows = (await em.query(
        `SELECT v."id", v."template", r."site_id", r."unit_id", s."elevation_m"
           FROM "route_versions" v
           JOIN "routes" r ON r."id" = v."route_id"
           JOIN "sites" s ON s."id" = r."site_id"
          WHERE v."id" = ANY($1::uuid[])`,
        [[...versionIds]],
      )) as VersionRow[];
      for (const v of rows) if (roles.has(v.site_id)) versions.set(v.id, v);
    }

    const rounds = new Map<string, RoundCtx>();
    for (const s of storedRounds.values()) {
      rounds.set(s.id, { id: s.id, siteId: s.site_id, version: versions.get(s.route_version_id)!, stored: true });
    }
    const newRounds = firstById(batch.rounds).filter(({ item }) => !storedRounds.has(item.id));
    for (const { item, index } of newRounds) {
      const version = versions.get(item.routeVersionId);
      if (!version) {
        issue(
          `rounds.${index}.routeVersionId`,
          'this route version does not exist (pull again for the current routes)',
        );
        continue;
      }
      rounds.set(item.id, { id: item.id, siteId: version.site_id, version, stored: false });
    }

    // 2. authorisation -----------------------------------------------------------------------
    for (const { item, index } of newRounds) {
      const ctx = rounds.get(item.id);
      if (ctx) assertMayPush(roles.get(ctx.siteId), `rounds.${index} (route version ${item.routeVersionId})`);
    }
    for (const s of storedRounds.values()) {
      if (!mayWriteRound({ technicianId: s.technician_id }, userId, roles.get(s.site_id))) throw roundNotYours(s.id);
    }

    // 3. validation of new items -------------------------------------------------------------
    const roundOf = (roundId: string, path: string): RoundCtx | undefined => {
      const ctx = rounds.get(roundId);
      if (!ctx && !batch.rounds.some((r) => r.id === roundId)) {
        issue(path, 'this round is neither in this push nor stored; push the round with its readings');
      }
      return ctx;
    };

    // readings
    const readingsSeen = await existingIds(em, 'readings', [...new Set(batch.readings.map((r) => r.id))]);
    const newReadings = firstById(batch.readings).filter(({ item }) => !readingsSeen.has(item.id));
    const instrumentIds = [...new Set(newReadings.map(({ item }) => item.instrumentId))];
    const instruments = new Map<string, Instrument>();
    if (instrumentIds.length) {
      const rows = await em
        .getRepository(InstrumentEntity)
        .createQueryBuilder('i')
        .innerJoin('units', 'u', 'u.id = i.unit_id')
        .where('i.id IN (:...ids)', { ids: instrumentIds })
        .andWhere('u.site_id IN (:...sites)', { sites: roles.size ? [...roles.keys()] : [NO_SITE] })
        .getMany();
      for (const i of rows) instruments.set(i.id, i);
    }
    const batchReadings = new Map(newReadings.map(({ item }) => [item.id, item]));
    const pointedReadings = await storedReadingsOn(
      em,
      [...roles.keys()],
      [...newReadings.map(({ item }) => item.supersedes), ...batch.photos.map((ph) => ph.readingId)],
    );

    interface ReadyReading {
      item: PushReading;
      index: number;
      inst: Instrument;
      ctx: RoundCtx;
      unit: string;
    }
    const ready: ReadyReading[] = [];
    for (const { item, index } of newReadings) {
      const p = `readings.${index}`;
      const ctx = roundOf(item.roundId, `${p}.roundId`);
      const inst = instruments.get(item.instrumentId);
      if (!inst) {
        issue(`${p}.instrumentId`, 'this instrument does not exist');
        continue;
      }
      if (!ctx) continue;
      if (inst.unitId !== ctx.version.unit_id) {
        issue(`${p}.instrumentId`, `instrument ${inst.tag} is not on the unit of round ${ctx.id}'s route`);
        continue;
      }
      if (item.supersedes) {
        const inBatch = batchReadings.get(item.supersedes);
        const stored = pointedReadings.get(item.supersedes);
        const old = inBatch
          ? { roundId: inBatch.roundId, instrumentId: inBatch.instrumentId }
          : stored
            ? { roundId: stored.round_id, instrumentId: stored.instrument_id }
            : null;
        if (item.supersedes === item.id) issue(`${p}.supersedes`, 'a reading cannot supersede itself');
        else if (!old) issue(`${p}.supersedes`, 'the reading it supersedes is neither in this push nor stored');
        else if (old.roundId !== item.roundId) {
          issue(
            `${p}.supersedes`,
            'the reading it supersedes is of another round: a re-take replaces a reading of its own round only',
          );
        } else if (old.instrumentId !== inst.id)
          issue(`${p}.supersedes`, `the reading it supersedes is of another instrument than ${inst.tag}`);
      }
      let unit: string;
      try {
        unit = resolveUnit(inst.quantity, item.unit).unit;
      } catch (e) {
        if (!(e instanceof UnitError)) throw e;
        issue(`${p}.unit`, `${inst.tag}: ${e.message}`);
        continue;
      }
      if (inst.quantity !== 'pressure' && item.reference) {
        issue(
          `${p}.reference`,
          `${inst.tag} measures ${inst.quantity}, which takes no pressure reference; got "${item.reference}"`,
        );
        continue;
      }
      if (inst.quantity === 'pressure' && !item.reference) {
        issue(`${p}.reference`, `${inst.tag} is a pressure: say absolute, gauge or vacuum`);
        continue;
      }
      if (inst.isBarometer && item.reference && item.reference !== 'absolute') {
        issue(`${p}.reference`, `${inst.tag} is a barometer and reads absolute pressure, got "${item.reference}"`);
        continue;
      }
      ready.push({ item, index, inst, ctx, unit });
    }

    // barometric pressure of each round: latest barometer reading (this batch, else stored), else elevation
    const barometric = new Map<string, number>();
    const supersededInBatch = new Set(newReadings.map(({ item }) => item.supersedes).filter(Boolean));
    for (const r of ready) {
      if (!r.inst.isBarometer || r.item.valueTyped === null || supersededInBatch.has(r.item.id)) continue;
      try {
        const pa = toSI({ quantity: 'pressure', value: r.item.valueTyped, unit: r.unit, reference: 'absolute' });
        barometric.set(r.ctx.id, siteBarometricPa({ barometricPa: pa })!);
      } catch (e) {
        if (!(e instanceof UnitError)) throw e;
        issue(`readings.${r.index}.valueTyped`, `${r.inst.tag} (barometer): ${e.message}`);
      }
    }
    const needBaro = [
      ...new Set(ready.filter((r) => r.inst.quantity === 'pressure' && !barometric.has(r.ctx.id)).map((r) => r.ctx)),
    ];
    if (needBaro.some((c) => c.stored)) {
      const rows = (await em.query(
        `SELECT DISTINCT ON (r."round_id") r."round_id", r."value_si"
           FROM "readings" r JOIN "instruments" i ON i."id" = r."instrument_id"
          WHERE r."round_id" = ANY($1::uuid[]) AND i."is_barometer" AND r."value_si" IS NOT NULL
            AND NOT EXISTS (SELECT 1 FROM "readings" s WHERE s."supersedes" = r."id")
          ORDER BY r."round_id", r."received_at" DESC, r."device_time" DESC`,
        [needBaro.filter((c) => c.stored).map((c) => c.id)],
      )) as { round_id: string; value_si: number }[];
      for (const row of rows) barometric.set(row.round_id, row.value_si);
    }
    for (const c of needBaro)
      if (!barometric.has(c.id)) barometric.set(c.id, barometricFromElevation(c.version.elevation_m));

    const readingRows: unknown[][] = [];
    for (const r of ready) {
      let si: number | null = null;
      if (r.item.valueTyped !== null) {
        try {
          si = toSI(
            {
              quantity: r.inst.quantity as Quantity,
              value: r.item.valueTyped,
              unit: r.unit,
              reference: r.item.reference ?? undefined,
            },
            { barometricPa: barometric.get(r.ctx.id) },
          );
        } catch (e) {
          if (!(e instanceof UnitError)) throw e;
          issue(`readings.${r.index}.${FIELD_OF_UNIT_ERROR[e.code]}`, `${r.inst.tag}: ${e.message}`);
          continue;
        }
      }
      const it = r.item;
      readingRows.push([
        it.id,
        it.roundId,
        it.instrumentId,
        it.valueTyped === null ? null : String(it.valueTyped),
        r.unit,
        it.reference ?? null,
        si,
        it.deviceTime,
        it.note ?? null,
        it.skipReason ?? null,
        it.supersedes ?? null,
        it.confirmedAfterFlag,
        JSON.stringify(it.flags),
        userId,
      ]);
    }

    // check answers
    const answersSeen = await existingIds(em, 'check_answers', [...new Set(batch.checkAnswers.map((a) => a.id))]);
    const answerRows: unknown[][] = [];
    for (const { item, index } of firstById(batch.checkAnswers).filter(({ item }) => !answersSeen.has(item.id))) {
      const p = `checkAnswers.${index}`;
      const ctx = roundOf(item.roundId, `${p}.roundId`);
      if (!ctx) continue;
      const check = checksById(ctx.version.template).get(item.checkId);
      if (!check) {
        issue(
          `${p}.checkId`,
          `check "${item.checkId}" is not on route "${ctx.version.template.id}" (version ${ctx.version.id})`,
        );
        continue;
      }
      if (check.kind !== item.answer.kind) {
        issue(`${p}.answer.kind`, `check "${check.id}" is ${check.kind}, got a ${item.answer.kind} answer`);
        continue;
      }
      if (check.kind === 'choice' && !check.options.includes(String(item.answer.value))) {
        issue(
          `${p}.answer.value`,
          `"${String(item.answer.value)}" is not an option of check "${check.id}": ${check.options.join(', ')}`,
        );
        continue;
      }
      answerRows.push([
        item.id,
        item.roundId,
        item.checkId,
        JSON.stringify(item.answer),
        item.note ?? null,
        item.deviceTime,
      ]);
    }

    // photos
    const photosSeen = await existingIds(em, 'photos', [...new Set(batch.photos.map((p) => p.id))]);
    const photoRows: unknown[][] = [];
    for (const { item, index } of firstById(batch.photos).filter(({ item }) => !photosSeen.has(item.id))) {
      const p = `photos.${index}`;
      const ctx = roundOf(item.roundId, `${p}.roundId`);
      if (!ctx) continue;
      if (item.readingId) {
        const readingRound =
          batchReadings.get(item.readingId)?.roundId ?? pointedReadings.get(item.readingId)?.round_id;
        if (!readingRound) issue(`${p}.readingId`, 'this reading is neither in this push nor stored');
        else if (readingRound !== item.roundId)
          issue(`${p}.readingId`, 'this reading is of another round than the photo');
      }
      if (item.checkId && !checksById(ctx.version.template).has(item.checkId)) {
        issue(`${p}.checkId`, `check "${item.checkId}" is not on route "${ctx.version.template.id}"`);
      }
      photoRows.push([
        item.id,
        item.roundId,
        item.readingId ?? null,
        item.checkId ?? null,
        item.sha256,
        item.mime,
        item.bytes,
      ]);
    }

    if (issues.length) {
      const summary = issues.map((d) => `${d.path}: ${d.message}`).join('; ');
      throw new AppError(400, 'validation', `Push refused, nothing of it was stored: ${summary}`, issues);
    }

    // 4. store -------------------------------------------------------------------------------
    const applied = zero();
    const touched = new Set<string>();

    const insertedRounds = await insertIgnoring(
      em,
      'rounds',
      [
        'id',
        'site_id',
        'route_version_id',
        'technician_id',
        'started_at_device',
        'finished_at_device',
        'received_at',
        'status',
        'dismissals',
        'client_clock_skew_ms',
        'device_id',
        'device_model_version',
      ],
      newRounds
        .filter(({ item }) => rounds.has(item.id))
        .map(({ item }) => {
          // a later copy of the round in the same batch may finish it
          const last = [...batch.rounds].reverse().find((r) => r.id === item.id)!;
          return [
            item.id,
            rounds.get(item.id)!.siteId,
            item.routeVersionId,
            userId,
            item.startedAt,
            last.finishedAt ?? null,
            receivedAt.toISOString(),
            last.status,
            JSON.stringify(last.dismissals),
            skewMs,
            batch.deviceId,
            last.modelVersion ?? null,
          ];
        }),
      '"id"',
    );
    for (const r of insertedRounds) touched.add(r.id);
    applied.rounds = insertedRounds.length;

    // stored rounds this push finishes (the one change a stored round takes)
    for (const r of firstById(batch.rounds.filter((x) => x.status === 'finished'))) {
      const s = storedRounds.get(r.item.id);
      if (!s || s.status !== 'in-progress') continue;
      const last = [...batch.rounds].reverse().find((x) => x.id === r.item.id && x.status === 'finished')!;
      const done = (await em.query(
        `UPDATE "rounds" SET "status" = 'finished', "finished_at_device" = $2, "dismissals" = $3
          WHERE "id" = $1 AND "status" = 'in-progress' RETURNING "id"`,
        [s.id, last.finishedAt ?? null, JSON.stringify(last.dismissals)],
      )) as [{ id: string }[], number];
      if (done[1] > 0) {
        applied.rounds += 1;
        touched.add(s.id);
      }
    }

    // Dismissals only grow: a stored round takes every dismissal it does not hold yet (the device
    // re-sends the whole round when one is added, before or after it finishes).
    for (const r of firstById(batch.rounds)) {
      const s = storedRounds.get(r.item.id);
      if (!s) continue;
      const incoming = batch.rounds.filter((x) => x.id === r.item.id).flatMap((x) => x.dismissals ?? []);
      if (incoming.length === 0) continue;
      const [row] = (await em.query(`SELECT "dismissals" FROM "rounds" WHERE "id" = $1 FOR UPDATE`, [s.id])) as {
        dismissals: unknown[];
      }[];
      const held = Array.isArray(row?.dismissals) ? (row.dismissals as Record<string, unknown>[]) : [];
      const key = (d: Record<string, unknown>) =>
        JSON.stringify([d.readingId ?? null, d.tag ?? null, d.flag, d.deviceTime]);
      const have = new Set(held.map(key));
      const added = incoming.filter((d) => {
        const k = key(d as Record<string, unknown>);
        if (have.has(k)) return false;
        have.add(k);
        return true;
      });
      if (added.length === 0) continue;
      await em.query(`UPDATE "rounds" SET "dismissals" = $2 WHERE "id" = $1`, [
        s.id,
        JSON.stringify([...held, ...added]),
      ]);
      touched.add(s.id);
    }

    const insertedReadings = await insertIgnoring(
      em,
      'readings',
      [
        'id',
        'round_id',
        'instrument_id',
        'value_typed',
        'unit',
        'reference',
        'value_si',
        'device_time',
        'note',
        'skip_reason',
        'supersedes',
        'confirmed_after_flag',
        'flags',
        'recorded_by',
      ],
      readingRows,
      '"id", "round_id"',
    );
    applied.readings = insertedReadings.length;
    for (const r of insertedReadings) touched.add(r.round_id);

    const insertedAnswers = await insertIgnoring(
      em,
      'check_answers',
      ['id', 'round_id', 'check_id', 'answer', 'note', 'device_time'],
      answerRows,
      '"id", "round_id"',
    );
    applied.checkAnswers = insertedAnswers.length;
    for (const r of insertedAnswers) touched.add(r.round_id);

    const insertedPhotos = await insertIgnoring(
      em,
      'photos',
      ['id', 'round_id', 'reading_id', 'check_id', 'sha256', 'mime', 'bytes'],
      photoRows,
      '"id", "round_id"',
    );
    applied.photos = insertedPhotos.length;
    for (const r of insertedPhotos) touched.add(r.round_id);

    const photoIds = [...new Set(batch.photos.map((p) => p.id))];
    const wanted = photoIds.length
      ? ((await em.query(
          `SELECT "id" FROM "photos" WHERE "id" = ANY($1::uuid[]) AND "status" = 'pending' ORDER BY "id"`,
          [photoIds],
        )) as {
          id: string;
        }[])
      : [];

    const duplicates: PushCounts = {
      rounds: batch.rounds.length - applied.rounds,
      readings: batch.readings.length - applied.readings,
      checkAnswers: batch.checkAnswers.length - applied.checkAnswers,
      photos: batch.photos.length - applied.photos,
    };
    return {
      response: { applied, duplicates, serverTime: new Date().toISOString(), photosWanted: wanted.map((w) => w.id) },
      roundIds: [...touched],
    };
  });
}
