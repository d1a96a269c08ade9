/**
 * Shifts in site-local time: three 8-hour shifts a day, starting at 06:00, 14:00 and 22:00 on the
 * site's wall clock (IANA time zone). On a daylight-saving change the night shift is an hour
 * longer or shorter in real time: a shift runs from its local start to the next shift's local start.
 *
 * Time-zone arithmetic uses Intl (Node ships full ICU); no time-zone library.
 */

/** Local start hours of the three shifts (morning, afternoon, night), common practice for three-shift plants. */
export const SHIFT_START_HOURS = [6, 14, 22] as const;
export const SHIFT_NAMES = ['morning', 'afternoon', 'night'] as const;
export type ShiftIndex = 0 | 1 | 2;

export interface LocalParts {
  year: number;
  /** 1–12 */
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat('en-US', {
        timeZone,
        hourCycle: 'h23',
        year: 'numeric',
        month: 'numeric',
        day: 'numeric',
        hour: 'numeric',
        minute: 'numeric',
        second: 'numeric',
      });
    } catch {
      throw new RangeError(`timezone "${timeZone}" is not an IANA time zone name (like "Europe/London")`);
    }
    formatters.set(timeZone, f);
  }
  return f;
}

function checkDate(d: Date, what: string): void {
  if (!(d instanceof Date) || !Number.isFinite(d.getTime()))
    throw new RangeError(`${what} must be a valid Date, got ${String(d)}`);
}

/** The wall-clock reading of an instant in a time zone. */
export function localParts(at: Date, timeZone: string): LocalParts {
  checkDate(at, 'at');
  const p: Record<string, number> = {};
  for (const part of formatter(timeZone).formatToParts(at))
    if (part.type !== 'literal') p[part.type] = Number(part.value);
  return { year: p.year, month: p.month, day: p.day, hour: p.hour, minute: p.minute, second: p.second };
}

/** Offset of the zone from UTC at an instant, ms (Europe/London in summer: +3 600 000). */
export function zoneOffsetMs(at: Date, timeZone: string): number {
  const p = localParts(at, timeZone);
  const asUtc = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
  return asUtc - Math.floor(at.getTime() / 1000) * 1000;
}

/**
 * The instant a wall-clock time names in a zone. Day overflow is allowed (day 32 → next month).
 * A time skipped by a spring-forward change maps to the instant one offset later; an ambiguous
 * autumn time to its first occurrence.
 */
export function zonedTime(
  year: number,
  month: number,
  day: number,
  hour: number,
  minute: number,
  timeZone: string,
): Date {
  const guess = Date.UTC(year, month - 1, day, hour, minute);
  if (!Number.isFinite(guess))
    throw new RangeError(`zonedTime: ${year}-${month}-${day} ${hour}:${minute} is not a date`);
  // the zone's offsets half a day either side cover any change near this time
  const before = zoneOffsetMs(new Date(guess - 43_200_000), timeZone);
  const after = zoneOffsetMs(new Date(guess + 43_200_000), timeZone);
  const valid = [before, after].map((o) => guess - o).filter((t) => zoneOffsetMs(new Date(t), timeZone) === guess - t);
  // skipped by a spring-forward change: the earlier offset, which lands as far past the gap as the time was into it
  const t = valid.length ? Math.min(...valid) : guess - before;
  return new Date(t);
}

export interface ShiftWindow {
  /** first instant of the shift */
  start: Date;
  /** first instant of the next shift */
  end: Date;
  index: ShiftIndex;
  name: (typeof SHIFT_NAMES)[number];
  /** the local date the shift starts on, YYYY-MM-DD */
  localDate: string;
}

const pad = (n: number) => String(n).padStart(2, '0');

function window(year: number, month: number, day: number, index: ShiftIndex, timeZone: string): ShiftWindow {
  const start = zonedTime(year, month, day, SHIFT_START_HOURS[index], 0, timeZone);
  const next =
    index === 2
      ? zonedTime(year, month, day + 1, SHIFT_START_HOURS[0], 0, timeZone)
      : zonedTime(year, month, day, SHIFT_START_HOURS[index + 1], 0, timeZone);
  const d = new Date(Date.UTC(year, month - 1, day));
  return {
    start,
    end: next,
    index,
    name: SHIFT_NAMES[index],
    localDate: `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`,
  };
}

/** The shift an instant falls in. */
export function shiftAt(at: Date, timeZone: string): ShiftWindow {
  const p = localParts(at, timeZone);
  if (p.hour < SHIFT_START_HOURS[0]) return window(p.year, p.month, p.day - 1, 2, timeZone);
  const index: ShiftIndex = p.hour < SHIFT_START_HOURS[1] ? 0 : p.hour < SHIFT_START_HOURS[2] ? 1 : 2;
  return window(p.year, p.month, p.day, index, timeZone);
}

/** The shift that starts at `start` (which must be a shift start in the zone). */
export function shiftStartingAt(start: Date, timeZone: string): ShiftWindow {
  checkDate(start, 'shiftStart');
  const w = shiftAt(start, timeZone);
  if (w.start.getTime() !== start.getTime()) {
    throw new RangeError(
      `shiftStart ${start.toISOString()} is not the start of a shift in ${timeZone} (shifts start at ${SHIFT_START_HOURS.map((h) => `${pad(h)}:00`).join(', ')} local; this instant is in the shift from ${w.start.toISOString()})`,
    );
  }
  return w;
}

/** The shift before the given one. */
export function previousShift(w: ShiftWindow, timeZone: string): ShiftWindow {
  return shiftAt(new Date(w.start.getTime() - 1), timeZone);
}

/** Shift `index` of the local date year-month-day (day overflow allowed). */
export function shiftOf(year: number, month: number, day: number, index: ShiftIndex, timeZone: string): ShiftWindow {
  return window(year, month, day, index, timeZone);
}
