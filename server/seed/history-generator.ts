/**
 * Invented operating history of the Fernhallow Works demo unit: months of rounds on its three
 * routes, as the technician's phone would push them (PushRequest version 2, shared/api/sync.ts).
 * Pure and deterministic: the same options give the same payloads byte for byte (seeded PRNG,
 * no clock, no Math.random). No database here; server/seed/history.ts stores the payloads.
 *
 * The plant: every shift the unit runs at a slightly different point. designPoint()
 * (shared/cycle/demo-unit.ts) rebuilds every state with IAPWS-IF97 from a few varied parameters,
 * so every mass and energy balance closes at the true values:
 *  - load: main steam flow 30 kg/s × (1 ± ~8 %: a daily swing peaking mid-afternoon, a slow
 *    weekly one, a little shift-to-shift scatter); process steam 9 kg/s × (1 ± ~10 %);
 *  - cooling water inlet 25 °C ± ~2 K (warmer in the afternoon, a slow weather swing); the
 *    cooling-water flow stays near design, so its temperature rise and the condenser's terminal
 *    temperature difference (TTD) scale with the condenser duty; the condenser pressure is the
 *    IF97 saturation pressure of cooling-water outlet + TTD (the hotwell is saturated at it);
 *  - weather: barometric pressure of the site elevation (ICAO standard atmosphere) ± ~250 Pa.
 *    Rounds without the barometer on them (turbine hall, condenser) are converted by the server
 *    with the standard-atmosphere value, as they would be in life; the weather swing is kept
 *    small so that this costs less than half a σ on the condenser vacuum gauge.
 *
 * The readings: each instrument reads the true value plus Gaussian noise, unclipped, with the σ
 * the analysis itself assigns the instrument (shared/cycle specSigmaOf: its accuracy spec at its
 * reference value) — the distribution the analysis assumes, so the demo shows the false-alarm
 * rate a plant whose instruments behave as specified would see. The number is typed to a tenth
 * of the scale division (or four significant figures where the spec gives no division). A healthy
 * reading never repeats exactly three rounds running: the stuck-value check compares exact
 * values, and a gauge read to a tenth of a division would otherwise repeat by chance now and then.
 *
 * The faults (parameters in DEFAULT_FAULTS, days counted from the first day, 0-based):
 *  - drift: TI-301 (deaerator outlet RTD) reads high by 0.05 K per day from day 20;
 *  - stuck: PI-402 (condenser absolute-pressure gauge) shows one value from its first round of
 *    day 40 on, while PI-401 (the vacuum gauge on the same shell) follows the condenser;
 *  - read as absolute: PI-302 (feed pump suction, a bar(g) gauge) typed as bar(a) on every 10th
 *    boiler-house round from day 3 until day 20 (six rounds): the face value with reference
 *    "absolute", so the server stores it one barometric pressure low;
 *  - fouling: the condenser's cooling-water side fouls from day 60, its TTD rising 0.1 K per
 *    day; condenser pressure and hotwell temperature follow through IF97 saturation.
 *
 * Why these instruments: only the deaerator's two gauges (PI-301, PI-302) are redundant among the
 * bar(g) gauges, so a gauge read as absolute can be told only there; of the first candidates,
 * PI-203 cannot be named at all (the LP extraction pressure is measured nowhere else) and TI-206
 * only past ~14 σ (the balances see 13 % of its error, W_jj = 0.13); TI-301 is the one thermometer outside
 * the condenser that its own route's readings can check (saturation at the deaerator pressure).
 * The read-as-absolute rounds end before TI-301 starts drifting: both sit on the deaerator, and
 * a drift of a kelvin moves the pressure the balances expect by ~12 kPa, which hides the
 * barometric offset of a gauge read as absolute.
 */
import { createHash } from 'node:crypto';
import { fernhallowRoutes } from '../../demo/routes';
import { fernhallowBarometer } from '../../demo/routes/fernhallow-site';
import type { RouteCheck, RouteTemplate } from '../../shared/route/template';
import { mulberry32 } from '../../shared/random';
import type { PushRequestV2 } from '../../shared/api/sync';
import { demoUnit, designPoint, DESIGN_PARAMETERS, type DesignParameters, type DesignPoint } from '../../demo/unit';
import { specSigmaOf } from '../../shared/cycle';
import type { Instrument } from '../../shared/cycle/model';
import { psat, tsat } from '../../shared/steam';
import { sigmaFor } from '../../shared/uncertainty';
import {
  barometricFromElevation,
  fromSI,
  fromSIDelta,
  toSI,
  type PressureRef,
  type Quantity,
} from '../../shared/units';
import { SHIFT_START_HOURS, localParts, shiftOf, type ShiftIndex } from '../mail/shifts';

export interface HistoryFaults {
  drift: { tag: string; fromDay: number; kelvinPerDay: number };
  stuck: { tag: string; fromDay: number };
  /** from fromDay (inclusive) until untilDay (exclusive), the first of its route's rounds and every nth after it */
  readAsAbsolute: { tag: string; fromDay: number; untilDay: number; everyNthRound: number };
  fouling: { fromDay: number; ttdKelvinPerDay: number };
}

export const DEFAULT_FAULTS: Readonly<HistoryFaults> = Object.freeze({
  drift: { tag: 'TI-301', fromDay: 20, kelvinPerDay: 0.05 },
  stuck: { tag: 'PI-402', fromDay: 40 },
  readAsAbsolute: { tag: 'PI-302', fromDay: 3, untilDay: 20, everyNthRound: 10 },
  fouling: { fromDay: 60, ttdKelvinPerDay: 0.1 },
});

/** Clean readings' noise: a normal deviate of this many σ (the analysis' own σ), unclipped. */
export const NOISE_SIGMAS = 1;
/** Amplitude of the barometric weather swing, Pa. */
export const WEATHER_AMPLITUDE_PA = 250;

export interface HistoryIds {
  /** the stored route version id of a route template (by template id) */
  routeVersionId(routeKey: string): string;
  /** the stored instrument id of a tag */
  instrumentId(tag: string): string;
}

export interface HistoryOptions {
  /** the first day: its local date in `timezone` is day 0 */
  start: Date;
  /** default 90 */
  days?: number;
  /** rounds of each route per day, one per shift; only 3 (the site's three shifts) */
  roundsPerDay?: 3;
  /** PRNG seed (uint32), default 1 */
  seed?: number;
  /** default Europe/London (Fernhallow Works) */
  timezone?: string;
  /** site elevation, m; default 112 (Fernhallow Works) */
  elevationM?: number;
  /** fault parameters; default DEFAULT_FAULTS */
  faults?: HistoryFaults;
  /** stored ids; default: name-based placeholders (uuidFor) */
  ids?: HistoryIds;
  /** the phone's id in the payloads */
  deviceId?: string;
}

export interface HistoryReading {
  tag: string;
  routeKey: string;
  roundId: string;
  readingId: string;
  quantity: Quantity;
  /** the true value, SI absolute */
  truthSI: number;
  /** what the server stores: the typed value converted with the round's barometric pressure */
  valueSI: number;
  valueTyped: number;
  unit: string;
  reference: PressureRef | null;
  /** the fault acting on this reading, if any */
  fault: 'drift' | 'stuck' | 'read-as-absolute' | null;
}

export interface HistoryRound {
  id: string;
  routeKey: string;
  startedAt: string;
  finishedAt: string;
}

export interface HistoryShift {
  /** 0-based, in time order */
  index: number;
  day: number;
  shift: ShiftIndex;
  /** shift window (site-local 06/14/22 h) */
  start: Date;
  end: Date;
  /** the site-local date the shift starts on, YYYY-MM-DD */
  localDate: string;
  /** days since the start of day 0 at the middle of the walk, for the fault ramps */
  t: number;
  /** actual barometric pressure, Pa */
  barometricPa: number;
  /** the barometer reading as the server stores it, Pa (the round's barometric pressure) */
  barometerSI: number;
  /** the plant parameters of this shift */
  parameters: DesignParameters;
  /** condenser terminal temperature difference, K (true) */
  condenserTTD: number;
  rounds: HistoryRound[];
  readings: HistoryReading[];
  payload: PushRequestV2;
}

export interface GeneratedHistory {
  start: Date;
  days: number;
  seed: number;
  timezone: string;
  faults: HistoryFaults;
  shifts: HistoryShift[];
}

// ---------------------------------------------------------------------------------------------
// determinism (mulberry32 from shared/random.ts, re-exported for the generator's tests)

export { mulberry32 };

/** Standard normal deviates by Box–Muller from a uniform source. */
export function normals(u: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    const u1 = Math.max(u(), 1e-300);
    const u2 = u();
    const r = Math.sqrt(-2 * Math.log(u1));
    spare = r * Math.sin(2 * Math.PI * u2);
    return r * Math.cos(2 * Math.PI * u2);
  };
}

/**
 * A fixed UUID for a name: SHA-256 of "trueround-history|seed|name", laid out as an RFC 9562
 * version 8 (custom) UUID. The same seed and name give the same id on every run.
 */
export function uuidFor(seed: number, name: string): string {
  const h = createHash('sha256').update(`trueround-history|${seed}|${name}`).digest();
  h[6] = (h[6] & 0x0f) | 0x80;
  h[8] = (h[8] & 0x3f) | 0x80;
  const x = h.subarray(0, 16).toString('hex');
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20, 32)}`;
}

// ---------------------------------------------------------------------------------------------
// the plant on one shift

const BASE = designPoint();
const DUTY0 = BASE.condenserDuty;
const RISE0 = DESIGN_PARAMETERS.coolingOutT - DESIGN_PARAMETERS.coolingInT;
const TTD0 = tsat(DESIGN_PARAMETERS.condenserP) - DESIGN_PARAMETERS.coolingOutT;

interface PlantState {
  params: DesignParameters;
  dp: DesignPoint;
  ttd: number;
  levels: Record<string, number>;
}

/** The plant at time t (days) and local hour h, with a little scatter from the PRNG. */
function plantAt(t: number, hour: number, foulingK: number, n: () => number): PlantState {
  const day = (phase: number) => Math.sin((2 * Math.PI * (hour - phase)) / 24);
  const load = 1 + 0.05 * day(9) + 0.025 * Math.sin((2 * Math.PI * t) / 7.3) + 0.005 * n();
  const process = 1 + 0.06 * day(11) + 0.035 * Math.sin((2 * Math.PI * t) / 5.1 + 1) + 0.01 * n();
  const cwIn = DESIGN_PARAMETERS.coolingInT + 1.2 * day(10) + 0.9 * Math.sin((2 * Math.PI * t) / 23 + 2) + 0.1 * n();
  const base: Partial<DesignParameters> = {
    mainSteamFlow: DESIGN_PARAMETERS.mainSteamFlow * load,
    processSteamFlow: DESIGN_PARAMETERS.processSteamFlow * process,
    coolingInT: cwIn,
  };
  // cooling-water flow near design: rise and TTD scale with the duty; a few passes settle it
  let dutyRatio = load;
  let dp = BASE;
  let params = DESIGN_PARAMETERS as DesignParameters;
  let ttd = TTD0;
  for (let pass = 0; pass < 4; pass++) {
    const rise = RISE0 * dutyRatio;
    ttd = TTD0 * dutyRatio + foulingK;
    const cwOut = cwIn + rise;
    params = { ...DESIGN_PARAMETERS, ...base, coolingOutT: cwOut, condenserP: psat(cwOut + ttd) };
    dp = designPoint(params);
    dutyRatio = dp.condenserDuty / DUTY0;
  }
  const levels: Record<string, number> = {};
  for (const [k, v] of Object.entries(dp.levels)) levels[k] = v + 0.02 * n();
  return { params, dp, ttd: tsat(params.condenserP) - params.coolingOutT, levels };
}

function truthOf(i: Instrument, s: PlantState, barometricPa: number): number {
  if (i.tag === fernhallowBarometer.tag) return barometricPa;
  if (i.quantity === 'power') return s.dp.power;
  if (i.quantity === 'level') return s.levels[i.equipment!];
  const st = s.dp.points[i.point!];
  return i.quantity === 'pressure' ? st.p : i.quantity === 'temperature' ? st.T : st.m;
}

// ---------------------------------------------------------------------------------------------
// typing a number as the technician does

function decimalsOf(step: number): number {
  return Math.max(0, Math.ceil(-Math.log10(step) - 1e-9));
}

/** The typing step in the gauge's unit: a tenth of the scale division, else four significant figures. */
function typingStep(i: Instrument, unit: string, shown: number): number {
  const res = (i.accuracy as { resolution?: number }).resolution;
  if (res) {
    return fromSIDelta(i.quantity, res, unit) / 10;
  }
  const mag = Math.floor(Math.log10(Math.max(Math.abs(shown), 1e-6)));
  return 10 ** (mag - 3);
}

function roundTo(v: number, step: number): number {
  return Number((Math.round(v / step) * step).toFixed(decimalsOf(step)));
}

// ---------------------------------------------------------------------------------------------

interface Slot {
  route: RouteTemplate;
  stopIndex: number;
  unit: string;
  reference: PressureRef | undefined;
}

function slotsByTag(): Map<string, Slot> {
  const out = new Map<string, Slot>();
  for (const route of fernhallowRoutes) {
    route.stops.forEach((stop, stopIndex) => {
      for (const r of stop.readings)
        if (!out.has(r.tag)) out.set(r.tag, { route, stopIndex, unit: r.unit, reference: r.reference });
    });
  }
  return out;
}

const iso = (ms: number) => new Date(ms).toISOString();

function healthyAnswer(
  c: RouteCheck,
): { kind: 'yes-no'; value: boolean } | { kind: 'choice'; value: string } | { kind: 'text'; value: string } {
  if (c.kind === 'yes-no') return { kind: 'yes-no', value: c.expected ?? true };
  if (c.kind === 'choice') return { kind: 'choice', value: c.options[0] };
  return { kind: 'text', value: 'Nothing unusual.' };
}

/** Minutes after the shift start at which each route's walk begins (walking order of a shift). */
const ROUTE_OFFSET_MIN: Record<string, number> = {
  'boiler-house': 50,
  'turbine-hall': 100,
  'condenser-cooling-water': 150,
};
/** Minutes spent at a stop. */
const STOP_MIN = 5;

function checkOptions(
  o: HistoryOptions,
): Required<Omit<HistoryOptions, 'ids' | 'deviceId'>> & { ids?: HistoryIds; deviceId: string } {
  if (!(o.start instanceof Date) || !Number.isFinite(o.start.getTime()))
    throw new RangeError(`history start must be a valid Date, got ${String(o.start)}`);
  const days = o.days ?? 90;
  if (!Number.isInteger(days) || days < 1 || days > 3650)
    throw new RangeError(`history days must be a whole number from 1 to 3650, got ${String(days)}`);
  const rpd = o.roundsPerDay ?? 3;
  if (rpd !== 3)
    throw new RangeError(
      `history roundsPerDay must be 3 (one per shift of the site's three shifts), got ${String(rpd)}`,
    );
  const seed = o.seed ?? 1;
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffffffff)
    throw new RangeError(`history seed must be a whole number from 0 to 4294967295, got ${String(seed)}`);
  return {
    start: o.start,
    days,
    roundsPerDay: 3,
    seed,
    timezone: o.timezone ?? 'Europe/London',
    elevationM: o.elevationM ?? 112,
    faults: o.faults ?? DEFAULT_FAULTS,
    ids: o.ids,
    deviceId: o.deviceId ?? 'demo-history-phone',
  };
}

/** Generates the history. See the file comment for what is in it. */
export function generateHistory(options: HistoryOptions): GeneratedHistory {
  const o = checkOptions(options);
  const { seed, timezone, faults } = o;
  const ids: HistoryIds = o.ids ?? {
    routeVersionId: (k) => uuidFor(seed, `route-version|${k}`),
    instrumentId: (t) => uuidFor(seed, `instrument|${t}`),
  };
  const uniform = mulberry32(seed);
  const n = normals(uniform);
  const noise = () => NOISE_SIGMAS * n();

  const slots = slotsByTag();
  const instruments: Instrument[] = [...demoUnit.instruments, fernhallowBarometer];
  for (const i of instruments)
    if (!slots.has(i.tag)) throw new Error(`history: instrument ${i.tag} is on no Fernhallow route`);
  const stdBaro = barometricFromElevation(o.elevationM);
  const day0 = localParts(o.start, timezone);

  const lastTyped = new Map<string, number[]>();
  let stuckValue: number | null = null;
  const roundCount = new Map<string, number>();
  let firstAbsRound: number | null = null;
  const shifts: HistoryShift[] = [];

  for (let day = 0; day < o.days; day++) {
    for (let s = 0 as ShiftIndex; s < 3; s = (s + 1) as ShiftIndex) {
      const index = day * 3 + s;
      const w = shiftOf(day0.year, day0.month, day0.day + day, s, timezone);
      const t = day + (SHIFT_START_HOURS[s] + 100 / 60) / 24;
      const hour = (SHIFT_START_HOURS[s] + 100 / 60) % 24;
      const fouling = t > faults.fouling.fromDay ? faults.fouling.ttdKelvinPerDay * (t - faults.fouling.fromDay) : 0;
      const plant = plantAt(t, hour, fouling, n);
      const weather =
        WEATHER_AMPLITUDE_PA *
          (0.6 * Math.sin((2 * Math.PI * t) / 5.3) + 0.4 * Math.sin((2 * Math.PI * t) / 11.7 + 0.7)) +
        20 * n();
      const baro = stdBaro + weather;
      const jitter = Math.round((uniform() - 0.5) * 20); // minutes, the whole shift's walk earlier or later

      // rounds of this shift
      const rounds = new Map<string, { round: HistoryRound; startMs: number }>();
      for (const route of fernhallowRoutes) {
        const startMs = w.start.getTime() + (ROUTE_OFFSET_MIN[route.id] ?? 60) * 60_000 + jitter * 60_000;
        const finishMs = startMs + (route.stops.length * STOP_MIN + 2) * 60_000;
        rounds.set(route.id, {
          round: {
            id: uuidFor(seed, `round|${index}|${route.id}`),
            routeKey: route.id,
            startedAt: iso(startMs),
            finishedAt: iso(finishMs),
          },
          startMs,
        });
        roundCount.set(route.id, (roundCount.get(route.id) ?? 0) + 1);
      }

      // the barometer first: the server converts the boiler-house gauges with it
      const readings: HistoryReading[] = [];
      const typedOf = new Map<
        string,
        { value: number; reference: PressureRef | undefined; fault: HistoryReading['fault'] }
      >();
      for (const i of instruments) {
        const slot = slots.get(i.tag)!;
        const truth = truthOf(i, plant, baro);
        const sigma =
          i.tag === fernhallowBarometer.tag ? sigmaFor(i.accuracy, stdBaro) : specSigmaOf(demoUnit, i, stdBaro)!;
        let measured = truth + noise() * sigma;
        let fault: HistoryReading['fault'] = null;
        if (i.tag === faults.drift.tag && t > faults.drift.fromDay) {
          measured += faults.drift.kelvinPerDay * (t - faults.drift.fromDay);
          fault = 'drift';
        }
        const reference = slot.reference;
        const shown = fromSI(i.quantity, measured, slot.unit, reference, { barometricPa: baro });
        const step = typingStep(i, slot.unit, shown);
        let typed = roundTo(shown, step);
        let typedRef = reference;
        if (i.tag === faults.stuck.tag && day >= faults.stuck.fromDay) {
          if (stuckValue === null) stuckValue = typed;
          typed = stuckValue;
          fault = 'stuck';
        } else {
          const prev = lastTyped.get(i.tag) ?? [];
          if (prev.length >= 2 && prev[prev.length - 1] === typed && prev[prev.length - 2] === typed)
            typed = roundTo(typed + (uniform() < 0.5 ? -step : step), step);
        }
        const routeRound = roundCount.get(slot.route.id)! - 1;
        if (
          i.tag === faults.readAsAbsolute.tag &&
          day >= faults.readAsAbsolute.fromDay &&
          day < faults.readAsAbsolute.untilDay
        ) {
          if (firstAbsRound === null) firstAbsRound = routeRound;
          if ((routeRound - firstAbsRound) % faults.readAsAbsolute.everyNthRound === 0) {
            typedRef = 'absolute';
            fault = 'read-as-absolute';
          }
        }
        const hist = lastTyped.get(i.tag) ?? [];
        hist.push(typed);
        if (hist.length > 2) hist.shift();
        lastTyped.set(i.tag, hist);
        typedOf.set(i.tag, { value: typed, reference: typedRef, fault });
      }
      const baroTyped = typedOf.get(fernhallowBarometer.tag)!;
      const barometerSI = toSI({
        quantity: 'pressure',
        value: baroTyped.value,
        unit: slots.get(fernhallowBarometer.tag)!.unit,
        reference: 'absolute',
      });
      const baroRoute = slots.get(fernhallowBarometer.tag)!.route.id;

      const payloadReadings: PushRequestV2['readings'] = [];
      const answers: PushRequestV2['checkAnswers'] = [];
      for (const route of fernhallowRoutes) {
        const { round, startMs } = rounds.get(route.id)!;
        const b = route.id === baroRoute ? barometerSI : stdBaro;
        route.stops.forEach((stop, stopIndex) => {
          const atStop = startMs + stopIndex * STOP_MIN * 60_000;
          stop.readings.forEach((r, k) => {
            const i = instruments.find((x) => x.tag === r.tag)!;
            const typed = typedOf.get(r.tag)!;
            const readingId = uuidFor(seed, `reading|${index}|${r.tag}`);
            const valueSI = toSI(
              { quantity: i.quantity, value: typed.value, unit: r.unit, reference: typed.reference },
              { barometricPa: b },
            );
            readings.push({
              tag: r.tag,
              routeKey: route.id,
              roundId: round.id,
              readingId,
              quantity: i.quantity,
              truthSI: truthOf(i, plant, baro),
              valueSI,
              valueTyped: typed.value,
              unit: r.unit,
              reference: typed.reference ?? null,
              fault: typed.fault,
            });
            payloadReadings.push({
              id: readingId,
              roundId: round.id,
              instrumentId: ids.instrumentId(r.tag),
              valueTyped: typed.value,
              unit: r.unit,
              reference: typed.reference ?? null,
              deviceTime: iso(atStop + (k + 1) * 30_000),
              note: null,
              skipReason: null,
              supersedes: null,
              confirmedAfterFlag: false,
              flags: [],
            });
          });
          stop.checks.forEach((c, k) => {
            answers.push({
              id: uuidFor(seed, `answer|${index}|${route.id}|${c.id}`),
              roundId: round.id,
              checkId: c.id,
              answer: healthyAnswer(c),
              note: null,
              deviceTime: iso(atStop + (stop.readings.length + k + 1) * 30_000),
            });
          });
        });
      }
      const roundList = fernhallowRoutes.map((r) => rounds.get(r.id)!.round);
      const lastFinish = Math.max(...roundList.map((r) => Date.parse(r.finishedAt)));
      shifts.push({
        index,
        day,
        shift: s,
        start: w.start,
        end: w.end,
        localDate: w.localDate,
        t,
        barometricPa: baro,
        barometerSI,
        parameters: plant.params,
        condenserTTD: plant.ttd,
        rounds: roundList,
        readings,
        payload: {
          payloadVersion: 2,
          deviceId: o.deviceId,
          sentAt: iso(lastFinish + 60_000),
          rounds: roundList.map((r) => ({
            id: r.id,
            routeVersionId: ids.routeVersionId(r.routeKey),
            startedAt: r.startedAt,
            finishedAt: r.finishedAt,
            status: 'finished' as const,
            dismissals: [],
          })),
          readings: payloadReadings,
          checkAnswers: answers,
          photos: [],
        },
      });
    }
  }
  return { start: o.start, days: o.days, seed, timezone, faults, shifts };
}

/** A shift's readings as analyseRound takes them (SI as stored), with its barometric pressure. */
export function analysisInput(shift: HistoryShift): {
  readings: { instrumentTag: string; valueSI: number }[];
  barometricPa: number;
} {
  return {
    readings: shift.readings
      .filter((r) => r.tag !== fernhallowBarometer.tag)
      .map((r) => ({ instrumentTag: r.tag, valueSI: r.valueSI })),
    barometricPa: shift.barometerSI,
  };
}

/** Condenser TTD design value, K (tsat of the design condenser pressure − cooling-water outlet). */
export const DESIGN_CONDENSER_TTD = TTD0;
