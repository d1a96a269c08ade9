/**
 * validateRoute: every refusal names the field (dotted path) and what is wrong. Sources: unit
 * spellings and quantities from shared/units (NIST SP 811 factors); tag letters from ISA-5.1
 * (first letter P pressure, T temperature, F flow, L level, J power); the rest of the rules
 * (unique ids, one reading per instrument per route, band min < max) is common practice for
 * route templates.
 */
import { parseRoute, quantityFromTag, RouteTemplateError, validateRoute, type RouteModel } from '@/checklists/validate';
import type { RouteTemplate } from '@/shared/route/template';

const model: RouteModel = {
  id: 'test-unit',
  instruments: [
    { tag: 'PI-101', quantity: 'pressure', pressureReference: 'gauge' },
    { tag: 'TI-101', quantity: 'temperature' },
    { tag: 'FI-101', quantity: 'massFlow' },
    { tag: 'LI-101', quantity: 'level' },
    { tag: 'PI-401', quantity: 'pressure', pressureReference: 'vacuum' },
  ],
};

function route(): RouteTemplate {
  return {
    id: 'test-route',
    name: 'Test route',
    unitId: 'test-unit',
    stops: [
      {
        id: 'drum',
        name: 'Drum',
        area: 'Boiler house, +24 m',
        caution: 'Hot surfaces',
        readings: [
          { tag: 'PI-101', unit: 'bar', reference: 'gauge', band: { min: 60, max: 72 }, required: true },
          { tag: 'TI-101', unit: '°C', band: { min: 270, max: 295 }, required: false },
        ],
        checks: [
          { id: 'glass-clear', prompt: 'Gauge glass clear?', kind: 'yes-no', expected: true, photoRequired: true },
        ],
      },
      {
        id: 'condenser',
        name: 'Condenser',
        area: 'Basement',
        readings: [{ tag: 'PI-401', unit: 'kPa', reference: 'vacuum', band: { min: 85, max: 95 }, required: true }],
        checks: [
          { id: 'screens', prompt: 'Screens', kind: 'choice', options: ['clear', 'fouled'], photoRequired: false },
        ],
      },
    ],
  };
}

const issuesOf = (t: unknown, m?: RouteModel) => {
  const r = validateRoute(t, m);
  if (r.ok) throw new Error('expected the route to be refused');
  return r.issues;
};

test('a good route passes with and without the model, and comes back parsed', () => {
  const a = validateRoute(route(), model);
  expect(a.ok).toBe(true);
  if (a.ok) expect(a.route.stops.map((s) => s.id)).toEqual(['drum', 'condenser']);
  expect(validateRoute(route()).ok).toBe(true);
});

test('duplicate stop ids: the second stop is named, with where the first is', () => {
  const t = route();
  t.stops[1].id = 'drum';
  expect(issuesOf(t, model)).toEqual([
    { path: 'stops.1.id', message: 'stop id "drum" is used twice (first at stops.0)' },
  ]);
});

test('duplicate check ids across stops', () => {
  const t = route();
  t.stops[1].checks[0].id = 'glass-clear';
  expect(issuesOf(t, model)).toEqual([
    {
      path: 'stops.1.checks.0.id',
      message: 'check id "glass-clear" is used twice on this route (first at stops.0.checks.0)',
    },
  ]);
});

test('the same tag twice on one route', () => {
  const t = route();
  t.stops[1].readings.push({ tag: 'TI-101', unit: '°C', band: { min: 270, max: 295 }, required: true });
  expect(issuesOf(t, model)).toEqual([
    { path: 'stops.1.readings.1.tag', message: 'TI-101 is read twice on this route (first at stops.0.readings.1)' },
  ]);
});

test('a tag the model does not have', () => {
  const t = route();
  t.stops[0].readings[1].tag = 'TI-999';
  expect(issuesOf(t, model)).toEqual([
    { path: 'stops.0.readings.1.tag', message: 'TI-999 is not an instrument of unit "test-unit"' },
  ]);
  // without a model the tag cannot be checked, and the route passes
  expect(validateRoute(t).ok).toBe(true);
});

test('a unit of the wrong quantity (°C for a pressure gauge) lists the units that fit (shared/units)', () => {
  const t = route();
  t.stops[0].readings[0].unit = '°C';
  const [issue, ...rest] = issuesOf(t, model);
  expect(rest).toEqual([]);
  expect(issue.path).toBe('stops.0.readings.0.unit');
  expect(issue.message).toBe(
    '"°C" is a temperature unit but PI-101 measures pressure; allowed: Pa, kPa, MPa, bar, mbar, psi, kgf/cm², inHg, mmHg, mmH₂O',
  );
});

test('without a model the quantity comes from the ISA-5.1 first letter: t/h on a TI is refused', () => {
  expect([
    quantityFromTag('PI-1'),
    quantityFromTag('TI-1'),
    quantityFromTag('FI-1'),
    quantityFromTag('LI-1'),
    quantityFromTag('JI-1'),
  ]).toEqual(['pressure', 'temperature', 'massFlow', 'level', 'power']);
  const t = route();
  t.stops[0].readings[1].unit = 't/h';
  expect(issuesOf(t)[0]).toEqual({
    path: 'stops.0.readings.1.unit',
    message: '"t/h" is a mass flow unit but TI-101 measures temperature; allowed: °C, °F, K',
  });
});

test('an unknown unit, and an alias where the unit id is wanted', () => {
  const t = route();
  t.stops[0].readings[0].unit = 'atm';
  t.stops[1].readings[0].unit = 'kpa';
  expect(issuesOf(t, model)).toEqual([
    {
      path: 'stops.0.readings.0.unit',
      message: 'unknown unit "atm"; a pressure takes Pa, kPa, MPa, bar, mbar, psi, kgf/cm², inHg, mmHg, mmH₂O',
    },
    { path: 'stops.1.readings.0.unit', message: 'write the unit as "kPa", not "kpa"' },
  ]);
});

test('pressure reference: missing on a pressure, present on a temperature, or not the model’s', () => {
  const t = route();
  delete t.stops[0].readings[0].reference;
  t.stops[0].readings[1].reference = 'gauge';
  t.stops[1].readings[0].reference = 'absolute';
  expect(issuesOf(t, model)).toEqual([
    {
      path: 'stops.0.readings.0.reference',
      message: 'PI-101 is a pressure: say what it reads against (absolute, gauge, vacuum)',
    },
    { path: 'stops.0.readings.1.reference', message: 'TI-101 is not a pressure and takes no reference, got "gauge"' },
    { path: 'stops.1.readings.0.reference', message: 'is "absolute" but PI-401 reads vacuum in the model' },
  ]);
});

test('band min ≥ max is refused (equal and reversed)', () => {
  const t = route();
  t.stops[0].readings[0].band = { min: 72, max: 72 };
  t.stops[0].readings[1].band = { min: 295, max: 270 };
  expect(issuesOf(t, model)).toEqual([
    { path: 'stops.0.readings.0.band', message: 'min 72 must be below max 72 (bar)' },
    { path: 'stops.0.readings.1.band', message: 'min 295 must be below max 270 (°C)' },
  ]);
});

test('a choice with a repeated option, and a stop with nothing to do', () => {
  const t = route();
  if (t.stops[1].checks[0].kind !== 'choice') throw new Error('fixture');
  t.stops[1].checks[0].options = ['clear', 'clear'];
  t.stops.push({ id: 'empty', name: 'Empty', area: 'Nowhere', readings: [], checks: [] });
  expect(issuesOf(t, model)).toEqual([
    { path: 'stops.1.checks.0.options.1', message: 'option "clear" is listed twice' },
    { path: 'stops.2', message: 'stop "empty" has no readings and no checks' },
  ]);
});

test('the template’s unit must be the model’s', () => {
  const t = route();
  t.unitId = 'other-unit';
  expect(issuesOf(t, model)).toEqual([
    { path: 'unitId', message: 'is "other-unit" but the model given is unit "test-unit"' },
  ]);
});

test('shape errors come from the schema with their paths: bad ids, tags, kinds, missing fields', () => {
  const t = route() as unknown as Record<string, unknown> & { stops: Record<string, unknown>[] };
  t.id = 'Boiler House';
  t.stops[0].readings = [{ tag: 'pressure-1', unit: 'bar', band: { min: 0, max: 1 }, required: true }];
  t.stops[0].checks = [{ id: 'x', prompt: 'Which?', kind: 'multiple', photoRequired: false }];
  delete t.stops[1].area;
  const issues = issuesOf(t, model);
  expect(issues).toEqual(
    expect.arrayContaining([
      { path: 'id', message: 'Must be a lower-case slug like "boiler-house" (a–z, 0–9, single hyphens)' },
      { path: 'stops.0.readings.0.tag', message: 'Must be an ISA-5.1 style tag like "PI-101" or "TI-203A"' },
      { path: 'stops.0.checks.0.kind', message: 'kind must be one of yes-no, choice, text' },
      { path: 'stops.1.area', message: 'Required' },
    ]),
  );
  expect(issuesOf({ id: 'r', name: 'R', unitId: 'u', stops: [] })).toEqual([
    { path: 'stops', message: 'A route needs at least one stop' },
  ]);
  expect(issuesOf('not a route')[0].path).toBe('(template)');
});

test('parseRoute throws one error listing every issue', () => {
  const t = route();
  t.stops[1].id = 'drum';
  t.stops[0].readings[0].band = { min: 80, max: 70 };
  let err: unknown;
  try {
    parseRoute(t, model);
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(RouteTemplateError);
  expect((err as RouteTemplateError).issues.map((i) => i.path)).toEqual(['stops.0.readings.0.band', 'stops.1.id']);
  expect((err as Error).message).toBe(
    'Route template "test-route" is invalid: stops.0.readings.0.band: min 80 must be below max 70 (bar); stops.1.id: stop id "drum" is used twice (first at stops.0)',
  );
});
