/**
 * The cycle model: state points, equipment with ports tied to points, and instruments.
 * zod schemas are the source; the TypeScript types are their z.infer. Pure, browser-safe.
 *
 * Conventions (SI throughout, as every module boundary of the project):
 *  - a point's nominal values are Pa absolute, K, kg/s, quality 0…1;
 *  - an instrument's range is in SI units *in the instrument's own reference*: Pa gauge for a
 *    gauge, Pa of vacuum (barometric − absolute) for a vacuum gauge, Pa absolute for an absolute
 *    one; K, kg/s, W; level as a fraction of span (1 = 100 %) or m;
 *  - `unit` is the unit printed on the instrument's face (one of shared/units' unit ids).
 */
import { z } from 'zod';
import { accuracySpecSchema } from '../uncertainty';
import { PRESSURE_REFERENCES, QUANTITIES } from '../units';

// ---------------------------------------------------------------------------------------------
// ids

const ID_RE = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/;
/** ISA-5.1 style tag: 2–4 letters (PI, TI, FI, JI, LI, PDI…), a dash, a loop number, optional suffix letter. */
export const TAG_RE = /^[A-Z]{2,4}-[0-9]{2,5}[A-Z]?$/;

const id = z.string().regex(ID_RE, 'must be 1–64 characters: letters, digits, "_", "-", "." (not first)');
const pointRef = id;

// ---------------------------------------------------------------------------------------------
// points

export const POINT_PHASES = ['liquid', 'vapour', 'two-phase', 'saturated-liquid', 'saturated-vapour', 'any'] as const;
export type PointPhase = (typeof POINT_PHASES)[number];

export const pointSchema = z.strictObject({
  id,
  label: z.string().min(1),
  /** expected phase: saturated and two-phase points are held at T = tsat(p) */
  phase: z.enum(POINT_PHASES),
  /** 'cooling': cooling-water side of a condenser (not part of the steam/water cycle's heat account) */
  circuit: z.enum(['cycle', 'cooling']).optional(),
  /** the point has no pressure instrument of its own and is at the pressure of that point (drop neglected) */
  samePressureAs: pointRef.optional(),
  /** design / nominal values: starting guesses, and the pressure assumed where nothing measures it */
  nominal: z
    .strictObject({
      p: z.number().positive().optional(),
      T: z.number().positive().optional(),
      m: z.number().nonnegative().optional(),
      x: z.number().min(0).max(1).optional(),
    })
    .optional(),
});
export type CyclePoint = z.infer<typeof pointSchema>;

// ---------------------------------------------------------------------------------------------
// equipment

const criticality = z.union([z.literal(1), z.literal(2), z.literal(3)]);
const base = { id, label: z.string().min(1), criticality };
const many = z.array(pointRef);

export const equipmentSchema = z.discriminatedUnion('kind', [
  z.strictObject({
    ...base,
    kind: z.literal('boiler'),
    ports: z.strictObject({ feedIn: pointRef, steamOut: pointRef, blowdownOut: pointRef.optional() }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('superheater'),
    ports: z.strictObject({ inlet: pointRef, outlet: pointRef }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('turbine-section'),
    ports: z.strictObject({ inlet: pointRef, outlet: pointRef, extractions: many.optional() }),
  }),
  z.strictObject({ ...base, kind: z.literal('pump'), ports: z.strictObject({ inlet: pointRef, outlet: pointRef }) }),
  z.strictObject({
    ...base,
    kind: z.literal('condenser'),
    ports: z.strictObject({
      steamIn: pointRef,
      drainsIn: many.optional(),
      condensateOut: pointRef,
      coolingIn: pointRef,
      coolingOut: pointRef,
    }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('closed-heater'),
    ports: z.strictObject({
      feedIn: pointRef,
      feedOut: pointRef,
      steamIn: pointRef,
      drainOut: pointRef,
      drainsIn: many.optional(),
    }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('deaerator'),
    ports: z.strictObject({
      steamIn: pointRef,
      inlets: many.optional(),
      outlet: pointRef,
      ventOut: pointRef.optional(),
    }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('drum'),
    ports: z.strictObject({ steam: pointRef, water: pointRef.optional() }),
  }),
  z.strictObject({ ...base, kind: z.literal('mixer'), ports: z.strictObject({ inlets: many, outlet: pointRef }) }),
  z.strictObject({ ...base, kind: z.literal('splitter'), ports: z.strictObject({ inlet: pointRef, outlets: many }) }),
  z.strictObject({
    ...base,
    kind: z.literal('throttle'),
    ports: z.strictObject({ inlet: pointRef, outlet: pointRef }),
  }),
  z.strictObject({
    ...base,
    kind: z.literal('generator'),
    /** ids of the turbine sections on this generator's shaft */
    sections: z.array(id),
    /** generator (electrical) efficiency: electrical output / shaft power, 0 < η ≤ 1 */
    efficiency: z.number(),
  }),
]);
export type Equipment = z.infer<typeof equipmentSchema>;
export type EquipmentKind = Equipment['kind'];
export const EQUIPMENT_KINDS = [
  'boiler',
  'superheater',
  'turbine-section',
  'pump',
  'condenser',
  'closed-heater',
  'deaerator',
  'drum',
  'mixer',
  'splitter',
  'throttle',
  'generator',
] as const satisfies readonly EquipmentKind[];

/** in: the point flows into the equipment; out: it flows out; state: the equipment holds the point's state (drum). */
export type PortRole = 'in' | 'out' | 'state';
export interface PortUse {
  port: string;
  point: string;
  role: PortRole;
  /** cooling-water side of a condenser */
  cooling?: boolean;
}

const PORT_ROLES: { readonly [K in Exclude<EquipmentKind, 'generator'>]: Readonly<Record<string, PortRole>> } = {
  boiler: { feedIn: 'in', steamOut: 'out', blowdownOut: 'out' },
  superheater: { inlet: 'in', outlet: 'out' },
  'turbine-section': { inlet: 'in', outlet: 'out', extractions: 'out' },
  pump: { inlet: 'in', outlet: 'out' },
  condenser: { steamIn: 'in', drainsIn: 'in', condensateOut: 'out', coolingIn: 'in', coolingOut: 'out' },
  'closed-heater': { feedIn: 'in', feedOut: 'out', steamIn: 'in', drainOut: 'out', drainsIn: 'in' },
  deaerator: { steamIn: 'in', inlets: 'in', outlet: 'out', ventOut: 'out' },
  drum: { steam: 'state', water: 'state' },
  mixer: { inlets: 'in', outlet: 'out' },
  splitter: { inlet: 'in', outlets: 'out' },
  throttle: { inlet: 'in', outlet: 'out' },
};

/** Every port of an equipment with its point, in the schema's port order (a generator has none). */
export function portUses(e: Equipment): PortUse[] {
  if (e.kind === 'generator') return [];
  const roles = PORT_ROLES[e.kind];
  const out: PortUse[] = [];
  const ports = e.ports as Record<string, string | string[] | undefined>;
  for (const port of Object.keys(roles)) {
    const v = ports[port];
    if (v === undefined) continue;
    const cooling = e.kind === 'condenser' && (port === 'coolingIn' || port === 'coolingOut');
    for (const point of Array.isArray(v) ? v : [v])
      out.push({ port, point, role: roles[port], ...(cooling ? { cooling } : {}) });
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// instruments

export const instrumentSchema = z.strictObject({
  /** ISA-5.1 tag, unique in the model: PI-101, TI-214, FI-301, JI-401 (power), LI-101 */
  tag: z.string().regex(TAG_RE, 'must be an ISA-5.1 tag such as PI-101, TI-214A'),
  /** optional database id; readings may name the instrument by tag or by id */
  id: z.string().min(1).optional(),
  label: z.string().min(1).optional(),
  /** what it is, e.g. "Bourdon gauge", "Pt100 RTD", "type K thermocouple" */
  device: z.string().min(1).optional(),
  quantity: z.enum(QUANTITIES),
  /** the point measured (pressure, temperature, mass flow) … */
  point: pointRef.optional(),
  /** … or the equipment (power: a generator; level: drum, deaerator, condenser hotwell, heater) */
  equipment: id.optional(),
  pressureReference: z.enum(PRESSURE_REFERENCES).optional(),
  /** scale range in SI, in the instrument's own reference (see the file comment) */
  range: z.strictObject({ min: z.number(), max: z.number() }),
  accuracy: accuracySpecSchema,
  /** unit on the instrument's face, e.g. "bar", "kPa", "°C", "t/h", "MW", "%" */
  unit: z.string().min(1),
  /** tag of a redundant instrument measuring the same quantity at the same place */
  twin: z.string().optional(),
});
export type Instrument = z.infer<typeof instrumentSchema>;

// ---------------------------------------------------------------------------------------------
// model

export const cycleModelSchema = z.strictObject({
  id,
  name: z.string().min(1),
  /** content hash of the canonical JSON of everything else (see modelVersion); computed when left out */
  version: z.string().optional(),
  points: z.array(pointSchema),
  equipment: z.array(equipmentSchema),
  instruments: z.array(instrumentSchema),
});
export type CycleModelInput = z.input<typeof cycleModelSchema>;
/** A model that passed validateModel: `version` is always set. */
export type CycleModel = z.infer<typeof cycleModelSchema> & { version: string };

// ---------------------------------------------------------------------------------------------
// canonical JSON and content hash

/**
 * JSON with object keys sorted (recursively), undefined members left out, arrays in order.
 * Numbers print as JSON.stringify prints them (shortest round-trip form, −0 as 0).
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) {
      throw new TypeError(`canonicalJson: ${String(value)} has no JSON form`);
    }
    if (value === undefined || typeof value === 'function' || typeof value === 'symbol' || typeof value === 'bigint') {
      throw new TypeError(`canonicalJson: a ${typeof value} has no JSON form`);
    }
    return JSON.stringify(value);
  }
  if (Array.isArray(value)) return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
}

/**
 * 64-bit FNV-1a (Fowler–Noll–Vo, the IETF draft-eastlake-fnv): offset basis 0xcbf29ce484222325,
 * prime 2⁴⁰ + 0x1b3, over the UTF-8 bytes of the text (surrogate pairs joined, a lone surrogate as
 * U+FFFD); 16 hex digits. Two 32-bit halves, no BigInt.
 */
export function fnv1a64(text: string): string {
  let hi = 0xcbf29ce4;
  let lo = 0x84222325;
  const step = (byte: number) => {
    lo = (lo ^ byte) >>> 0;
    // (hi·2³² + lo)·(2⁴⁰ + 435) mod 2⁶⁴
    const pl = lo * 435; // < 2⁴¹, exact
    const carry = Math.floor(pl / 4294967296);
    hi = (Math.imul(hi, 435) + carry + (lo << 8)) >>> 0;
    lo = (pl - carry * 4294967296) >>> 0;
  };
  for (let i = 0; i < text.length; i++) {
    let c = text.charCodeAt(i);
    if (c < 0x80) {
      step(c);
      continue;
    }
    if (c >= 0xd800 && c <= 0xdbff && i + 1 < text.length) {
      const d = text.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        c = 0x10000 + ((c - 0xd800) << 10) + (d - 0xdc00);
        i++;
      } else c = 0xfffd;
    } else if (c >= 0xd800 && c <= 0xdfff) c = 0xfffd;
    if (c < 0x800) {
      step(0xc0 | (c >> 6));
      step(0x80 | (c & 63));
    } else if (c < 0x10000) {
      step(0xe0 | (c >> 12));
      step(0x80 | ((c >> 6) & 63));
      step(0x80 | (c & 63));
    } else {
      step(0xf0 | (c >> 18));
      step(0x80 | ((c >> 12) & 63));
      step(0x80 | ((c >> 6) & 63));
      step(0x80 | (c & 63));
    }
  }
  return hi.toString(16).padStart(8, '0') + lo.toString(16).padStart(8, '0');
}

/** The model's content version: "fnv1a64:" + the hash of the canonical JSON of the model without `version`. */
export function modelVersion(model: Omit<CycleModelInput, 'version'> & { version?: string }): string {
  const rest: Record<string, unknown> = { ...model };
  delete rest.version;
  return `fnv1a64:${fnv1a64(canonicalJson(rest))}`;
}
