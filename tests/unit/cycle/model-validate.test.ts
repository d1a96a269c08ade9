/**
 * The cycle model's validator: every refusal path, with the part named; the content version.
 * Expected behaviours are the project's own rules (DESIGN.md, domain model) — "common practice"
 * checks of a schema, except the FNV-1a test vectors, which come from the FNV reference
 * (draft-eastlake-fnv, test vectors for FNV-1a 64) and are cross-checked against Python below.
 */
import { canonicalJson, fnv1a64, modelVersion, validateModel, type CycleModelInput } from '@/shared/cycle';
import { demoUnit } from '@/demo/unit';
import { python } from './helpers';

type M = CycleModelInput & Record<string, unknown>;
const fresh = (): M => {
  const m = structuredClone(demoUnit) as M;
  delete m.version;
  return m;
};
const eq = (m: M, id: string) =>
  (m.equipment as { id: string; ports?: Record<string, unknown> }[]).find((e) => e.id === id)! as Record<string, any>;
const pt = (m: M, id: string) => (m.points as Record<string, any>[]).find((p) => p.id === id)!;
const ins = (m: M, tag: string) => (m.instruments as Record<string, any>[]).find((i) => i.tag === tag)!;

interface Case {
  name: string;
  mutate: (m: M) => void;
  path: RegExp;
  message: RegExp;
}

const cases: Case[] = [
  // shape (zod)
  {
    name: 'unknown equipment kind',
    mutate: (m) => (eq(m, 'cep').kind = 'compressor'),
    path: /^equipment\[cep\]\.kind$/,
    message: /./,
  },
  {
    name: 'missing port',
    mutate: (m) => delete eq(m, 'bfp').ports.outlet,
    path: /^equipment\[bfp\]\.ports\.outlet$/,
    message: /./,
  },
  { name: 'unknown field (typo)', mutate: (m) => (pt(m, 'ms').lable = 'x'), path: /^points\[ms\]$/, message: /lable/ },
  {
    name: 'criticality 4',
    mutate: (m) => (eq(m, 'hp').criticality = 4),
    path: /^equipment\[hp\]\.criticality$/,
    message: /./,
  },
  {
    name: 'tag not ISA-5.1',
    mutate: (m) => (ins(m, 'TI-201').tag = 'temp 201'),
    path: /^instruments\[temp 201\]\.tag$/,
    message: /ISA-5\.1/,
  },
  {
    name: 'bad accuracy spec',
    mutate: (m) => (ins(m, 'TI-201').accuracy = { kind: 'iec60751', class: 'Z' }),
    path: /^instruments\[TI-201\]\.accuracy/,
    message: /./,
  },
  { name: 'unknown phase', mutate: (m) => (pt(m, 'ms').phase = 'steam'), path: /^points\[ms\]\.phase$/, message: /./ },
  // ids
  {
    name: 'duplicate point id',
    mutate: (m) => (m.points as any[]).push({ ...pt(m, 'mu') }),
    path: /^points\[mu\]$/,
    message: /used twice/,
  },
  {
    name: 'duplicate equipment id',
    mutate: (m) => (m.equipment as any[]).push({ ...eq(m, 'prv') }),
    path: /^equipment\[prv\]$/,
    message: /used twice/,
  },
  {
    name: 'duplicate tag',
    mutate: (m) => (m.instruments as any[]).push({ ...ins(m, 'TI-205') }),
    path: /^instruments\[TI-205\]$/,
    message: /used twice/,
  },
  {
    name: 'duplicate instrument id',
    mutate: (m) => {
      ins(m, 'TI-205').id = 'x1';
      ins(m, 'TI-206').id = 'x1';
    },
    path: /^instruments\[TI-206\]\.id$/,
    message: /"x1" is used twice/,
  },
  // ports
  {
    name: 'port tied to unknown point',
    mutate: (m) => (eq(m, 'lph').ports.steamIn = 'nowhere'),
    path: /^equipment\[lph\]\.ports\.steamIn$/,
    message: /unknown point "nowhere"/,
  },
  {
    name: 'one point on two ports',
    mutate: (m) => (eq(m, 'lph').ports.drainOut = 'lhf'),
    path: /^equipment\[lph\]\.ports\.drainOut$/,
    message: /on two of its ports/,
  },
  {
    name: 'point with two producers',
    mutate: (m) => (eq(m, 'cep').ports.outlet = 'lhf'),
    path: /^points\[lhf\]$/,
    message: /two producers/,
  },
  {
    name: 'point with two consumers',
    mutate: (m) => (eq(m, 'prv').ports.inlet = 'lpi'),
    path: /^points\[lpi\]$/,
    message: /two consumers/,
  },
  {
    name: 'point tied to no port',
    mutate: (m) => (m.points as any[]).push({ id: 'spare', label: 'Spare', phase: 'liquid', nominal: { p: 1e5 } }),
    path: /^points\[spare\]$/,
    message: /tied to no equipment/,
  },
  {
    name: 'splitter with one outlet',
    mutate: (m) => (eq(m, 'hdr').ports.outlets = ['proc']),
    path: /^equipment\[hdr\]\.ports\.outlets$/,
    message: /at least two outlets/,
  },
  {
    name: 'mixer with one inlet',
    mutate: (m) =>
      (m.equipment as any[]).push({
        id: 'mx',
        kind: 'mixer',
        label: 'Mixer',
        criticality: 1,
        ports: { inlets: ['proc'], outlet: 'spare' },
      }),
    path: /^equipment\[mx\]\.ports\.inlets$/,
    message: /at least two inlets/,
  },
  {
    name: 'cooling water not liquid',
    mutate: (m) => (pt(m, 'cwo').phase = 'any'),
    path: /^equipment\[cond\]\.ports\.coolingOut$/,
    message: /must be declared liquid/,
  },
  {
    name: 'cooling water not on the cooling circuit',
    mutate: (m) => delete pt(m, 'cwi').circuit,
    path: /^points\[cwi\]\.circuit$/,
    message: /circuit "cooling"/,
  },
  {
    name: 'drum steam not saturated vapour',
    mutate: (m) => (pt(m, 'drum').phase = 'vapour'),
    path: /^equipment\[drum\]\.ports\.steam$/,
    message: /saturated-vapour/,
  },
  {
    name: 'drum water not saturated liquid',
    mutate: (m) => {
      eq(m, 'drum').ports.water = 'mu';
    },
    path: /^equipment\[drum\]\.ports\.water$/,
    message: /saturated-liquid/,
  },
  // samePressureAs
  {
    name: 'samePressureAs itself',
    mutate: (m) => (pt(m, 'lhf').samePressureAs = 'lhf'),
    path: /^points\[lhf\]\.samePressureAs$/,
    message: /of itself/,
  },
  {
    name: 'samePressureAs unknown',
    mutate: (m) => (pt(m, 'lhf').samePressureAs = 'zz'),
    path: /^points\[lhf\]\.samePressureAs$/,
    message: /unknown point "zz"/,
  },
  {
    name: 'samePressureAs circle',
    mutate: (m) => {
      pt(m, 'lpe').samePressureAs = 'lhd';
    },
    path: /^points\[(lpe|lhd)\]\.samePressureAs$/,
    message: /circle/,
  },
  // generator
  {
    name: 'generator efficiency above 1',
    mutate: (m) => (eq(m, 'gen').efficiency = 1.2),
    path: /^equipment\[gen\]\.efficiency$/,
    message: /\(0, 1\]/,
  },
  {
    name: 'generator without sections',
    mutate: (m) => (eq(m, 'gen').sections = []),
    path: /^equipment\[gen\]\.sections$/,
    message: /drives no turbine section/,
  },
  {
    name: 'generator section unknown',
    mutate: (m) => (eq(m, 'gen').sections = ['hp', 'ip']),
    path: /^equipment\[gen\]\.sections$/,
    message: /"ip" is not an equipment/,
  },
  {
    name: 'generator section not a turbine',
    mutate: (m) => (eq(m, 'gen').sections = ['hp', 'cep']),
    path: /^equipment\[gen\]\.sections$/,
    message: /not a turbine-section/,
  },
  {
    name: 'turbine section on two generators',
    mutate: (m) =>
      (m.equipment as any[]).push({
        id: 'gen2',
        kind: 'generator',
        label: 'Gen 2',
        criticality: 1,
        sections: ['lp'],
        efficiency: 0.97,
      }),
    path: /^equipment\[gen2\]\.sections$/,
    message: /on two generators/,
  },
  // instruments
  {
    name: 'instrument on point and equipment',
    mutate: (m) => (ins(m, 'TI-205').equipment = 'lph'),
    path: /^instruments\[TI-205\]$/,
    message: /both a point and an equipment/,
  },
  {
    name: 'temperature without point',
    mutate: (m) => delete ins(m, 'TI-205').point,
    path: /^instruments\[TI-205\]\.point$/,
    message: /must name the point/,
  },
  {
    name: 'instrument on unknown point',
    mutate: (m) => (ins(m, 'TI-205').point = 'nowhere'),
    path: /^instruments\[TI-205\]\.point$/,
    message: /unknown point "nowhere"/,
  },
  {
    name: 'power without equipment',
    mutate: (m) => delete ins(m, 'JI-601').equipment,
    path: /^instruments\[JI-601\]\.equipment$/,
    message: /must name the equipment/,
  },
  {
    name: 'instrument on unknown equipment',
    mutate: (m) => (ins(m, 'LI-101').equipment = 'tank'),
    path: /^instruments\[LI-101\]\.equipment$/,
    message: /unknown equipment "tank"/,
  },
  {
    name: 'power on a pump',
    mutate: (m) => (ins(m, 'JI-601').equipment = 'bfp'),
    path: /^instruments\[JI-601\]\.equipment$/,
    message: /read on a generator/,
  },
  {
    name: 'level on a turbine',
    mutate: (m) => (ins(m, 'LI-101').equipment = 'hp'),
    path: /^instruments\[LI-101\]\.equipment$/,
    message: /drum, deaerator, condenser or heater/,
  },
  {
    name: 'pressure without reference',
    mutate: (m) => delete ins(m, 'PI-201').pressureReference,
    path: /^instruments\[PI-201\]\.pressureReference$/,
    message: /without a reference/,
  },
  {
    name: 'reference on a thermometer',
    mutate: (m) => (ins(m, 'TI-201').pressureReference = 'gauge'),
    path: /^instruments\[TI-201\]\.pressureReference$/,
    message: /makes no sense/,
  },
  {
    name: 'range min = max',
    mutate: (m) => (ins(m, 'PI-201').range = { min: 1e5, max: 1e5 }),
    path: /^instruments\[PI-201\]\.range$/,
    message: /must be below max/,
  },
  {
    name: 'range min > max',
    mutate: (m) => (ins(m, 'TI-201').range = { min: 700, max: 300 }),
    path: /^instruments\[TI-201\]\.range$/,
    message: /must be below max/,
  },
  {
    name: 'unknown unit',
    mutate: (m) => (ins(m, 'PI-201').unit = 'atm'),
    path: /^instruments\[PI-201\]\.unit$/,
    message: /not a known unit/,
  },
  {
    name: 'unit of another quantity',
    mutate: (m) => (ins(m, 'PI-201').unit = '°C'),
    path: /^instruments\[PI-201\]\.unit$/,
    message: /temperature unit/,
  },
  {
    name: 'twin is itself',
    mutate: (m) => (ins(m, 'TI-201').twin = 'TI-201'),
    path: /^instruments\[TI-201\]\.twin$/,
    message: /itself/,
  },
  {
    name: 'twin does not exist',
    mutate: (m) => (ins(m, 'TI-201').twin = 'TI-999'),
    path: /^instruments\[TI-201\]\.twin$/,
    message: /TI-999 is not an instrument/,
  },
  {
    name: 'twin measures another quantity',
    mutate: (m) => (ins(m, 'TI-201').twin = 'PI-201'),
    path: /^instruments\[TI-201\]\.twin$/,
    message: /measures pressure/,
  },
  {
    name: 'twin on another point',
    mutate: (m) => (ins(m, 'TI-201').twin = 'TI-202'),
    path: /^instruments\[TI-201\]\.twin$/,
    message: /on hpx but its twin TI-202 is on proc/,
  },
  {
    name: 'twin not reciprocal',
    mutate: (m) => {
      (m.instruments as any[]).push({ ...ins(m, 'TI-102B'), tag: 'TI-102C', twin: 'TI-102B' });
    },
    path: /^instruments\[TI-102C\]\.twin$/,
    message: /but TI-102B names TI-102A/,
  },
  {
    name: 'point without a source for its pressure',
    mutate: (m) => {
      delete pt(m, 'mu').nominal.p;
    },
    path: /^points\[mu\]$/,
    message: /no pressure instrument, no samePressureAs and no nominal pressure/,
  },
  {
    name: 'version not the content hash',
    mutate: (m) => (m.version = 'fnv1a64:0000000000000000'),
    path: /^version$/,
    message: /does not match the model's content hash/,
  },
];

describe('validateModel refuses a broken model, naming the part (project rules, DESIGN.md domain model)', () => {
  test('the demo unit is valid and gets its content version', () => {
    const r = validateModel(fresh());
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.model.version).toBe(demoUnit.version);
  });
  test.each(cases)('$name', ({ mutate, path, message }) => {
    const m = fresh();
    mutate(m);
    const r = validateModel(m);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const hit = r.errors.find((e) => path.test(e.path) && message.test(e.message));
    if (!hit) throw new Error(`no error at ${path} matching ${message}; got ${JSON.stringify(r.errors)}`);
  });
  test('not an object at all', () => {
    const r = validateModel(42);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0].path).toBe('(model)');
  });
});

describe('content version (FNV-1a 64 over canonical JSON)', () => {
  // FNV reference test vectors for FNV-1a 64 (draft-eastlake-fnv; recalled from memory and
  // confirmed by the independent Python computation below)
  test.each([
    ['', 'cbf29ce484222325'],
    ['a', 'af63dc4c8601ec8c'],
    ['foobar', '85944171f73967e8'],
  ])('fnv1a64(%j) = %s (FNV reference vectors)', (text, hex) => {
    expect(fnv1a64(text)).toBe(hex);
  });
  test('agrees with a Python FNV-1a 64 over UTF-8 for non-ASCII text (independent implementation)', () => {
    const texts = ['Fernhallow Works — Unit 1', '°C ±σ', 'emoji 😀 pair', canonicalJson(demoUnit).slice(0, 4000)];
    const ours = texts.map(fnv1a64);
    const theirs = python<string[]>(
      `import json,sys\ntexts=json.loads(${JSON.stringify(JSON.stringify(texts))})\ndef f(b):\n  h=0xcbf29ce484222325\n  for x in b:\n    h^=x; h=(h*0x100000001b3)%2**64\n  return '%016x'%h\nprint(json.dumps([f(t.encode('utf-8')) for t in texts]))`,
    );
    expect(ours).toEqual(theirs);
  });
  test('does not depend on key order, changes with content', () => {
    const m = fresh();
    const reordered = Object.fromEntries(Object.entries(m).reverse()) as M;
    expect(modelVersion(reordered)).toBe(modelVersion(m));
    const changed = fresh();
    pt(changed, 'mu').label = 'Returns';
    expect(modelVersion(changed)).not.toBe(modelVersion(m));
    expect(canonicalJson({ b: 1, a: [2, { d: 3, c: undefined }] })).toBe('{"a":[2,{"d":3}],"b":1}');
  });
  test('canonical JSON refuses what JSON cannot hold', () => {
    expect(() => canonicalJson({ a: NaN })).toThrow(/NaN has no JSON form/);
    expect(() => canonicalJson(() => 1)).toThrow(/function has no JSON form/);
  });
});
