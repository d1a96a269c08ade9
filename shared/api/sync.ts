/**
 * Wire schemas of offline sync. Pure zod: the device's outbox builds these, the server parses the
 * same schemas.
 *
 *   POST /api/sync/push          PushRequest  → PushResponse
 *   GET  /api/sync/pull?siteId=&cursor=N      → PullResponse
 *   POST /api/photos/:id         multipart field "photo" → PhotoUploadResponse
 *   GET  /api/photos/:id, /api/photos/:id/thumb  → the image bytes
 *
 * Every round, reading, answer and photo carries a UUID made on the device: a push replayed any
 * number of times stores each thing once. Device times are kept as evidence, never used for order.
 *
 * Payload versions: the server takes the current one (2) and the previous one (1).
 *  - 1: rounds without `dismissals`, readings without `flags` and `confirmedAfterFlag`.
 *  - 2: adds them (what the phone flagged at the gauge, and what the technician dismissed).
 * A version-1 batch is read as version 2 with those fields empty / false.
 */
import { z } from 'zod';
import { RouteTemplate } from '../route/template';
import { PRESSURE_REFERENCES, QUANTITIES } from '../units';

export const CURRENT_PAYLOAD_VERSION = 2;
export const ACCEPTED_PAYLOAD_VERSIONS = [1, 2] as const;

/** Most items (rounds + readings + answers + photos) in one push. */
export const MAX_BATCH_ITEMS = 2000;
/** Largest photo a push may announce, bytes (the upload's own limit is the server's PHOTO_MAX_BYTES). */
export const MAX_ANNOUNCED_PHOTO_BYTES = 100 * 1024 * 1024;
/** |value| limit of a typed reading: far above any plant reading, catches a pasted serial number. */
export const MAX_ABS_VALUE = 1e12;

export const PHOTO_MIMES = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif'] as const;
export type PhotoMime = (typeof PHOTO_MIMES)[number];

const req = (what: string) => (iss: { input?: unknown }) => (iss.input === undefined ? 'Required' : `Must be ${what}`);

export const ClientId = z.uuid({ error: req('a UUID') });
const str = (max: number) => z.string({ error: req('a string') }).max(max, `Must be at most ${max} characters`);
const optionalText = (max: number) => str(max).nullable().optional();
/** ISO 8601 with an offset or Z, as the device's clock gave it. */
export const DeviceTime = z.iso.datetime({
  offset: true,
  error: req('an ISO 8601 date-time like 2025-11-30T07:42:10Z'),
});
const finite = z
  .number({ error: req('a finite number') })
  .min(-MAX_ABS_VALUE, `Must be at least ${-MAX_ABS_VALUE}`)
  .max(MAX_ABS_VALUE, `Must be at most ${MAX_ABS_VALUE}`);
const flagCode = str(64).regex(/^[a-z][a-z0-9-]*$/, 'Must be a lower-case code like "out-of-range"');

export const ROUND_STATUSES = ['in-progress', 'finished'] as const;
export const RoundStatus = z.enum(ROUND_STATUSES, { error: 'Must be one of in-progress, finished' });
export type RoundStatus = z.infer<typeof RoundStatus>;

/** A flag the phone raised on the spot and the technician dismissed (version 2). */
export const Dismissal = z.object({
  readingId: ClientId.optional(),
  tag: str(40).optional(),
  flag: flagCode,
  note: optionalText(500),
  deviceTime: DeviceTime,
});
export type Dismissal = z.infer<typeof Dismissal>;

/** A check the phone made at the gauge (version 2): "out-of-range", "saturation", "twin", "last-round"… */
export const ReadingFlag = z.object({ code: flagCode, message: str(500) });
export type ReadingFlag = z.infer<typeof ReadingFlag>;

const roundV1 = {
  id: ClientId,
  /** The route version the round was started on; it keeps it even when a newer one is published. */
  routeVersionId: ClientId,
  startedAt: DeviceTime,
  finishedAt: DeviceTime.nullable().optional(),
  status: RoundStatus,
};
export const PushRoundV1 = z.object(roundV1);
export const PushRound = z.object({
  ...roundV1,
  dismissals: z.array(Dismissal).max(500, 'At most 500 dismissals per round'),
  /** The cycle model version the device held for the round's unit (its checks and roundCheck used it). */
  modelVersion: str(64).optional(),
});
export type PushRound = z.infer<typeof PushRound>;

const readingV1 = {
  id: ClientId,
  roundId: ClientId,
  instrumentId: ClientId,
  /** The number as typed, in `unit`; null when the reading was skipped (then skipReason says why). */
  valueTyped: finite.nullable(),
  /** As shared/units spells it: "bar", "°C", "t/h"… */
  unit: str(16).min(1, 'Must not be empty'),
  /** Pressure only. */
  reference: z.enum(PRESSURE_REFERENCES, { error: 'Must be one of absolute, gauge, vacuum' }).nullable().optional(),
  deviceTime: DeviceTime,
  note: optionalText(2000),
  skipReason: optionalText(500),
  /** A correction: the id of the reading this one replaces (readings are append-only). */
  supersedes: ClientId.nullable().optional(),
};
const readingRules = <T extends { valueTyped: number | null; skipReason?: string | null }>(
  r: T,
  ctx: z.RefinementCtx,
) => {
  if (r.valueTyped === null && !r.skipReason) {
    ctx.addIssue({ code: 'custom', path: ['skipReason'], message: 'A reading without a value needs a skip reason' });
  }
  if (r.valueTyped !== null && r.skipReason) {
    ctx.addIssue({ code: 'custom', path: ['skipReason'], message: 'A reading with a value takes no skip reason' });
  }
};
export const PushReadingV1 = z.object(readingV1).superRefine(readingRules);
export const PushReading = z
  .object({
    ...readingV1,
    /** The technician re-read and kept the value after the phone flagged it. */
    confirmedAfterFlag: z.boolean({ error: 'Must be true or false' }),
    flags: z.array(ReadingFlag).max(20, 'At most 20 flags per reading'),
  })
  .superRefine(readingRules);
export type PushReading = z.infer<typeof PushReading>;

export const CheckAnswerValue = z.discriminatedUnion(
  'kind',
  [
    z.object({ kind: z.literal('yes-no'), value: z.boolean({ error: req('true or false') }) }),
    z.object({ kind: z.literal('choice'), value: str(120).min(1, 'Must not be empty') }),
    z.object({ kind: z.literal('text'), value: str(2000) }),
  ],
  { error: (iss) => (iss.code === 'invalid_union' ? 'kind must be one of yes-no, choice, text' : undefined) },
);
export type CheckAnswerValue = z.infer<typeof CheckAnswerValue>;

export const PushCheckAnswer = z.object({
  id: ClientId,
  roundId: ClientId,
  /** The check's id in the round's route version template. */
  checkId: str(64).min(1, 'Must not be empty'),
  answer: CheckAnswerValue,
  note: optionalText(2000),
  deviceTime: DeviceTime,
});
export type PushCheckAnswer = z.infer<typeof PushCheckAnswer>;

/** A photo's metadata; its bytes go separately to POST /api/photos/:id. */
export const PushPhoto = z
  .object({
    id: ClientId,
    roundId: ClientId,
    readingId: ClientId.nullable().optional(),
    checkId: str(64).nullable().optional(),
    /** Lower-case hex SHA-256 of the bytes the device will upload. */
    sha256: z.string({ error: req('a string') }).regex(/^[0-9a-f]{64}$/, 'Must be 64 lower-case hex digits (SHA-256)'),
    mime: z.enum(PHOTO_MIMES, { error: `Must be one of ${PHOTO_MIMES.join(', ')}` }),
    bytes: z
      .number({ error: req('a whole number of bytes') })
      .int('Must be a whole number of bytes')
      .min(1, 'Must be at least 1')
      .max(MAX_ANNOUNCED_PHOTO_BYTES, `Must be at most ${MAX_ANNOUNCED_PHOTO_BYTES}`),
  })
  .superRefine((p, ctx) => {
    if (p.readingId && p.checkId)
      ctx.addIssue({ code: 'custom', path: ['checkId'], message: 'A photo belongs to a reading or a check, not both' });
  });
export type PushPhoto = z.infer<typeof PushPhoto>;

const batchBase = {
  /** The device's own id (made once at install), for the logs. */
  deviceId: str(128).min(1, 'Must not be empty'),
  /** The device's clock when it sent the batch; the server records receive time − sentAt as the skew. */
  sentAt: DeviceTime,
  checkAnswers: z.array(PushCheckAnswer).max(MAX_BATCH_ITEMS),
  photos: z.array(PushPhoto).max(MAX_BATCH_ITEMS),
};
const items = (max: number) => `At most ${max} items (rounds, readings, answers and photos together) per push`;

export const PushRequestV1 = z.object({
  payloadVersion: z.literal(1),
  ...batchBase,
  rounds: z.array(PushRoundV1).max(MAX_BATCH_ITEMS, items(MAX_BATCH_ITEMS)),
  readings: z.array(PushReadingV1).max(MAX_BATCH_ITEMS, items(MAX_BATCH_ITEMS)),
});
export const PushRequestV2 = z.object({
  payloadVersion: z.literal(2),
  ...batchBase,
  rounds: z.array(PushRound).max(MAX_BATCH_ITEMS, items(MAX_BATCH_ITEMS)),
  readings: z.array(PushReading).max(MAX_BATCH_ITEMS, items(MAX_BATCH_ITEMS)),
});
export type PushRequestV2 = z.input<typeof PushRequestV2>;

/**
 * What POST /api/sync/push accepts: version 1 or 2, read as version 2 (`PushBatch`).
 */
export const PushRequest = z
  .discriminatedUnion('payloadVersion', [PushRequestV1, PushRequestV2], {
    error: (iss) =>
      iss.code === 'invalid_union'
        ? `payloadVersion must be ${ACCEPTED_PAYLOAD_VERSIONS.join(' or ')} (the current ${CURRENT_PAYLOAD_VERSION} or the previous ${CURRENT_PAYLOAD_VERSION - 1}), got ${JSON.stringify(
            (iss.input as { payloadVersion?: unknown } | undefined)?.payloadVersion,
          )}`
        : undefined,
  })
  .superRefine((b, ctx) => {
    const n = b.rounds.length + b.readings.length + b.checkAnswers.length + b.photos.length;
    if (n > MAX_BATCH_ITEMS) ctx.addIssue({ code: 'custom', path: [], message: `${items(MAX_BATCH_ITEMS)}; got ${n}` });
  })
  .transform((b) =>
    b.payloadVersion === 2
      ? b
      : {
          ...b,
          payloadVersion: 2 as const,
          receivedAsVersion: 1 as const,
          rounds: b.rounds.map((r): PushRound => ({ ...r, dismissals: [] })),
          readings: b.readings.map((r) => ({ ...r, confirmedAfterFlag: false, flags: [] })),
        },
  );
export type PushRequest = z.input<typeof PushRequest>;
export type PushBatch = z.output<typeof PushRequest>;

const counts = z.object({
  rounds: z.number().int().min(0),
  readings: z.number().int().min(0),
  checkAnswers: z.number().int().min(0),
  photos: z.number().int().min(0),
});
export type PushCounts = z.infer<typeof counts>;

export const PushResponse = z.object({
  /** Newly stored (a round also counts when this push finished it). */
  applied: counts,
  /** Already there (a replay; a replay with changed content is ignored and counted here too). */
  duplicates: counts,
  /** ISO 8601, the server's clock. */
  serverTime: z.iso.datetime(),
  /** Photo ids of this push whose bytes the server does not have yet: upload them. */
  photosWanted: z.array(z.uuid()),
});
export type PushResponse = z.infer<typeof PushResponse>;

export const PullQuery = z.object({
  siteId: z.uuid({ error: req('a site UUID') }),
  /** The cursor of the last pull applied; 0 (or absent) for everything. */
  cursor: z
    .string({ error: req('a whole number') })
    .regex(/^\d{1,15}$/, 'Must be a whole number ≥ 0 (the cursor of the last pull)')
    .default('0')
    .transform(Number),
});
export type PullQuery = z.input<typeof PullQuery>;

export const INSTRUMENT_STATUSES = ['ok', 'suspect', 'out-of-service'] as const;
export const InstrumentStatus = z.enum(INSTRUMENT_STATUSES);
export type InstrumentStatus = z.infer<typeof InstrumentStatus>;

export const SyncUnit = z.object({
  id: z.uuid(),
  siteId: z.uuid(),
  name: z.string(),
  /** The unit's cycle model (shared/cycle), as stored. */
  model: z.unknown(),
  /** Content hash of the model (shared/cycle modelVersion). */
  modelVersion: z.string(),
  syncVersion: z.number().int(),
});
export type SyncUnit = z.infer<typeof SyncUnit>;

export const SyncInstrument = z.object({
  id: z.uuid(),
  unitId: z.uuid(),
  tag: z.string(),
  quantity: z.enum(QUANTITIES),
  /** The model's state point / equipment the instrument sits on. */
  pointRef: z.string().nullable(),
  equipmentRef: z.string().nullable(),
  /** Pressure instruments only. */
  reference: z.enum(PRESSURE_REFERENCES).nullable(),
  /** Scale range in SI, in the instrument's own reference (Pa gauge for a gauge…), as in the cycle model. */
  range: z.object({ min: z.number(), max: z.number() }).nullable(),
  /** Accuracy specification (shared/uncertainty), as stored. */
  accuracy: z.unknown(),
  gaugeUnit: z.string(),
  /** YYYY-MM-DD */
  calibrationDate: z.string().nullable(),
  calibrationIntervalDays: z.number().int().nullable(),
  status: InstrumentStatus,
  isBarometer: z.boolean(),
  updatedAt: z.iso.datetime(),
  rowVersion: z.number().int(),
  syncVersion: z.number().int(),
});
export type SyncInstrument = z.infer<typeof SyncInstrument>;

export const SyncRoute = z.object({
  id: z.uuid(),
  siteId: z.uuid(),
  unitId: z.uuid(),
  name: z.string(),
  /** The route's current (latest published) version: start new rounds on this one. */
  version: z.object({
    id: z.uuid(),
    number: z.number().int().min(1),
    publishedAt: z.iso.datetime(),
    template: RouteTemplate,
  }),
  syncVersion: z.number().int(),
});
export type SyncRoute = z.infer<typeof SyncRoute>;

/**
 * What changed since the cursor. Each item is the whole current row, keyed by id: applying the
 * same pull twice gives the same state. Send `cursor` back on the next pull.
 */
export const PullResponse = z.object({
  cursor: z.number().int().min(0),
  units: z.array(SyncUnit),
  instruments: z.array(SyncInstrument),
  routes: z.array(SyncRoute),
  serverTime: z.iso.datetime(),
});
export type PullResponse = z.infer<typeof PullResponse>;

export const PhotoUploadResponse = z.object({
  id: z.uuid(),
  stored: z.literal(true),
  /** False when the server had the photo already (a repeated upload). */
  created: z.boolean(),
  mime: z.string(),
  width: z.number().int(),
  height: z.number().int(),
  thumbWidth: z.number().int(),
  thumbHeight: z.number().int(),
});
export type PhotoUploadResponse = z.infer<typeof PhotoUploadResponse>;
