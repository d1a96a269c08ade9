/**
 * Shapes of the JSON the device store keeps, parsed on every read. Reference data is stored as
 * the server sent it (the sync wire schemas); outbox payloads are the wire items they will be
 * pushed as. A row that does not parse is reported (Store.badRows) and left out, never thrown at
 * a screen.
 */
import { z } from 'zod';
import {
  CheckAnswerValue,
  PushCheckAnswer,
  PushPhoto,
  PushReading,
  PushRound,
  ReadingFlag,
  SyncInstrument,
  SyncRoute,
  SyncUnit,
} from '@/shared/api/sync';

export const StoredUnit = SyncUnit;
export const StoredInstrument = SyncInstrument;
export const StoredRoute = SyncRoute;
export const StoredRouteVersion = SyncRoute.shape.version.extend({ routeId: z.uuid() });
export type StoredRouteVersion = z.infer<typeof StoredRouteVersion>;
export const StoredFlags = z.array(ReadingFlag);
export const StoredAnswer = CheckAnswerValue;

export const OUTBOX_KINDS = ['round', 'reading', 'checkAnswer', 'photo'] as const;
export type OutboxKind = (typeof OUTBOX_KINDS)[number];

export const OutboxPayload = {
  round: PushRound,
  reading: PushReading,
  checkAnswer: PushCheckAnswer,
  photo: PushPhoto,
} as const;

export type OutboxPayloadOf<K extends OutboxKind> = z.output<(typeof OutboxPayload)[K]>;

/** A short, readable account of why a value did not parse ("answer.kind: …; deviceTime: …"). */
export function describeIssues(error: z.ZodError): string {
  return error.issues
    .slice(0, 5)
    .map((i) => `${i.path.length ? i.path.join('.') : '(value)'}: ${i.message}`)
    .join('; ');
}
