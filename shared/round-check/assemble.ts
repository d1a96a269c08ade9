/**
 * The inputs of a round check, assembled the same way on the phone and on the server.
 *
 * A route covers only part of the unit, but the balances need readings from all over it. The
 * unit-level readings of a round are:
 *  - every current reading of this round (superseded ones are left out: a re-take replaces the
 *    earlier reading, both stay stored);
 *  - for each instrument of the model that is NOT on this round's route (and not read on it), the
 *    most recent reading with a value from another round of the same unit, taken within the
 *    window (ROUND_CHECK_WINDOW_HOURS, 4 h) before the reference time `at`.
 * Instruments on this route that this round has not read stay missing: the technician is still
 * there to read them.
 *
 * Earlier rounds of the same route (oldest first, at most HISTORY_ROUNDS) are the history the
 * stuck-value check looks at.
 *
 * Pure and deterministic: times are data (ms since the epoch, from the device clock), ties are
 * broken by `order`, every list comes out in model or walking order. Values are SI absolute; the
 * caller converts what was typed (the phone with the round's barometric pressure, the server
 * through its stored value_si).
 */
import type { AnalysisOptions, RoundContext, RoundReading } from '../cycle/types';

/**
 * How far back other rounds' readings are borrowed for the instruments a route does not read.
 * Project choice: half a shift. Readings are combined only when they were taken close enough in
 * time to describe one operating state. The routes of one shift are walked within about 3 h; a
 * unit's load and cooling-water temperature swing over the day, so readings from the previous
 * shift (8 h earlier) no longer balance with this round's, and the balances would blame healthy
 * flow meters for the change of load. With 12 h the 90-day demo history named healthy flow
 * meters in up to a third of its rounds; with 4 h, none.
 */
export const ROUND_CHECK_WINDOW_HOURS = 4;
/** Earlier rounds of the same route handed to the stuck-value check. */
export const HISTORY_ROUNDS = 4;

export interface RoundCheckReading {
  /** the reading's client id */
  id: string;
  tag: string;
  /** SI absolute; null for a skipped reading */
  valueSI: number | null;
  /** device time, ms since the epoch */
  time: number;
  /** tie-break between equal times: the device's local insertion order (or any stable order) */
  order: number;
}

export interface RoundCheckStop {
  name: string;
  /** the tags read at this stop, in walking order */
  tags: string[];
}

export interface CheckedRound {
  id: string;
  routeId: string;
  routeName: string;
  stops: RoundCheckStop[];
  /** ms since the epoch (device time) */
  startedAt: number;
  finishedAt: number | null;
  status: 'in-progress' | 'finished';
  /** the round's barometric pressure, Pa absolute */
  barometricPa: number;
  /** current readings only (a superseded reading is left out) */
  readings: RoundCheckReading[];
}

export interface RoundCheckDismissal {
  tag: string;
  note: string;
  /** the reading it was made on; a re-take after it makes it lapse */
  readingId?: string;
}

export interface RoundCheckRouteInfo {
  id: string;
  name: string;
  stops: RoundCheckStop[];
}

export interface RoundCheckInput {
  /** the unit's cycle model (validated by analyseRound) */
  model: unknown;
  round: CheckedRound;
  /** other rounds of the same unit (any order); the checked round among them is ignored */
  others: CheckedRound[];
  /** reference time, ms: the round's finish time, or now while it is under way */
  at: number;
  windowHours?: number;
  dismissals?: RoundCheckDismissal[];
  /** the unit's routes, to say on which route a missing instrument is read */
  routes?: RoundCheckRouteInfo[];
  options?: AnalysisOptions;
}

export interface ReadingSource {
  roundId: string;
  readingId: string;
  /** true: read on the checked round */
  own: boolean;
}

export interface BorrowedRound {
  roundId: string;
  routeName: string;
  startedAt: number;
  /** the tags taken from it, in model order */
  tags: string[];
}

export interface NotRead {
  tag: string;
  /** the route that reads it, when known */
  routeName: string | null;
  /** on this round's route (so it can still be read now) */
  onThisRoute: boolean;
}

export interface AssembledRoundCheck {
  readings: RoundReading[];
  sources: Record<string, ReadingSource>;
  borrowed: BorrowedRound[];
  notRead: NotRead[];
  context: RoundContext;
  /** tag → { stop index, position in the stop } on this round's route */
  walk: Record<string, { stop: number; position: number }>;
  windowHours: number;
}

export class RoundCheckInputError extends Error {
  constructor(
    readonly field: string,
    readonly value: unknown,
    message: string,
  ) {
    super(
      `${field}: ${message} (got ${typeof value === 'number' || typeof value === 'string' ? JSON.stringify(value) : typeof value})`,
    );
    this.name = 'RoundCheckInputError';
  }
}

const fin = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** later first: time, then order, then id (code-unit order) */
const newer = (a: RoundCheckReading, b: RoundCheckReading) =>
  a.time !== b.time ? a.time > b.time : a.order !== b.order ? a.order > b.order : a.id > b.id;

function modelTags(model: unknown): string[] {
  const list = (model as { instruments?: { tag?: unknown }[] } | null)?.instruments;
  if (!Array.isArray(list))
    throw new RoundCheckInputError('model.instruments', list, 'the cycle model has no instrument list');
  return list.map((i) => i?.tag).filter((t): t is string => typeof t === 'string');
}

function assertRoundShape(r: CheckedRound, field: string) {
  if (!r || typeof r !== 'object') throw new RoundCheckInputError(field, r, 'must be a round');
  if (!fin(r.startedAt))
    throw new RoundCheckInputError(`${field}.startedAt`, r.startedAt, 'must be a time in ms since the epoch');
  if (!Array.isArray(r.readings)) throw new RoundCheckInputError(`${field}.readings`, r.readings, 'must be an array');
  for (const [i, x] of r.readings.entries()) {
    if (x.valueSI !== null && !fin(x.valueSI))
      throw new RoundCheckInputError(
        `${field}.readings.${i}.valueSI`,
        x.valueSI,
        `${x.tag}: must be a finite SI value or null`,
      );
    if (!fin(x.time))
      throw new RoundCheckInputError(
        `${field}.readings.${i}.time`,
        x.time,
        `${x.tag}: must be a time in ms since the epoch`,
      );
  }
}

/** The unit-level readings and context of the round, by the rule above. */
export function assembleRoundCheck(input: RoundCheckInput): AssembledRoundCheck {
  const { round } = input;
  assertRoundShape(round, 'round');
  if (!fin(input.at)) throw new RoundCheckInputError('at', input.at, 'must be a time in ms since the epoch');
  if (!fin(round.barometricPa))
    throw new RoundCheckInputError('round.barometricPa', round.barometricPa, 'must be a barometric pressure in Pa');
  const windowHours = input.windowHours ?? ROUND_CHECK_WINDOW_HOURS;
  if (!fin(windowHours) || windowHours <= 0)
    throw new RoundCheckInputError('windowHours', windowHours, 'must be a positive number of hours');
  const tags = modelTags(input.model);
  const others = (input.others ?? []).filter((o) => o.id !== round.id);
  others.forEach((o, i) => assertRoundShape(o, `others.${i}`));

  const walk: AssembledRoundCheck['walk'] = {};
  round.stops.forEach((s, si) => s.tags.forEach((t, pi) => (walk[t] ??= { stop: si, position: pi })));

  // own readings: the latest current one of each tag (a round holds one current reading per tag)
  const own = new Map<string, RoundCheckReading>();
  for (const r of round.readings) {
    const had = own.get(r.tag);
    if (!had || newer(r, had)) own.set(r.tag, r);
  }

  // borrowed: most recent reading with a value in [at − window, at] from another round
  const from = input.at - windowHours * 3.6e6;
  const best = new Map<string, { r: RoundCheckReading; round: CheckedRound }>();
  for (const o of others) {
    for (const r of o.readings) {
      if (r.valueSI === null || r.time < from || r.time > input.at) continue;
      if (r.tag in walk || own.has(r.tag)) continue;
      const had = best.get(r.tag);
      if (!had || newer(r, had.r)) best.set(r.tag, { r, round: o });
    }
  }

  const readings: RoundReading[] = [];
  const sources: Record<string, ReadingSource> = {};
  const byRound = new Map<string, BorrowedRound>();
  const notRead: NotRead[] = [];
  const routeOf = (tag: string): string | null => {
    if (tag in walk) return round.routeName;
    for (const rt of input.routes ?? []) if (rt.stops.some((s) => s.tags.includes(tag))) return rt.name;
    return null;
  };
  const modelSet = new Set(tags);
  for (const tag of tags) {
    const mine = own.get(tag);
    if (mine && mine.valueSI !== null) {
      readings.push({ instrumentTag: tag, valueSI: mine.valueSI });
      sources[tag] = { roundId: round.id, readingId: mine.id, own: true };
      continue;
    }
    const b = best.get(tag);
    if (b) {
      readings.push({ instrumentTag: tag, valueSI: b.r.valueSI! });
      sources[tag] = { roundId: b.round.id, readingId: b.r.id, own: false };
      const br = byRound.get(b.round.id) ?? {
        roundId: b.round.id,
        routeName: b.round.routeName,
        startedAt: b.round.startedAt,
        tags: [],
      };
      br.tags.push(tag);
      byRound.set(b.round.id, br);
      continue;
    }
    notRead.push({ tag, routeName: routeOf(tag), onThisRoute: tag in walk });
  }
  // readings of the round outside the model (the site barometer) are not the cycle's: left out

  const history = others
    .filter((o) => o.routeId === round.routeId && o.startedAt < round.startedAt)
    .sort((a, b) => a.startedAt - b.startedAt || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
    .slice(-HISTORY_ROUNDS)
    .map((o) => ({
      readings: o.readings
        .filter((r) => r.valueSI !== null && modelSet.has(r.tag))
        .sort((a, b) => a.time - b.time || a.order - b.order)
        .map((r) => ({ instrumentTag: r.tag, valueSI: r.valueSI! })),
    }));

  const borrowed = [...byRound.values()].sort((a, b) => a.startedAt - b.startedAt || (a.roundId < b.roundId ? -1 : 1));
  return {
    readings,
    sources,
    borrowed,
    notRead,
    context: {
      barometricPa: round.barometricPa,
      previousRounds: history,
      ...(input.options ? { options: input.options } : {}),
    },
    walk,
    windowHours,
  };
}
