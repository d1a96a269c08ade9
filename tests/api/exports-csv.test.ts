/**
 * CSV exports on a real PostgreSQL: RFC 4180 shape (quoted fields, doubled quotes, CRLF) and
 * spreadsheet formula injection neutralised as the OWASP "CSV Injection" page says — a text cell
 * starting with =, +, -, @, a tab or a carriage return gets a leading single quote; numbers stay
 * numbers.
 */
import { runAnalysisJob } from '../../server/analysis/job';
import { memoryLogger } from './helpers/app';
import { api, makeWorld, parseCsv, pushRound, type World } from './analysis-helpers';

let w: World;
const base = () => `/api/sites/${w.fernId}`;
const NOTES: Record<string, string> = {
  'TI-102A': '=HYPERLINK("http://evil.example/x","click")',
  'TI-102B': '+SUM(1,2)',
  'PI-102': '-2+3',
  'FI-101': '@cmd',
  'TI-201': '\tindented',
  'TI-202': '\rreturn',
  'JI-601': 'plain, with a comma and "quotes"',
};

beforeAll(async () => {
  w = await makeWorld();
  const deps = { dataSource: w.db.dataSource, logger: memoryLogger('silent').logger };
  const a = await pushRound(w, { notes: NOTES, bias: { 'TI-102A': 10 } });
  await runAnalysisJob(deps, a.roundId);
  // a gauge typed slightly below zero (bar(g)) is a negative number, not a formula
  const b = await pushRound(w, { typed: { 'PI-203': -0.05 } });
  await runAnalysisJob(deps, b.roundId);
});
afterAll(() => w?.db.drop());

function assertNeutral(rows: string[][]) {
  for (const row of rows) {
    for (const c of row) {
      if (/^[=+@\t\r]/.test(c)) throw new Error(`cell ${JSON.stringify(c)} would run as a formula`);
      if (c.startsWith('-') && !/^-\d+(\.\d+)?(e[-+]?\d+)?$/i.test(c))
        throw new Error(`cell ${JSON.stringify(c)} would run as a formula`);
    }
  }
}

test('readings.csv: every reading with its reconciled value; text cells that start like formulas are quoted off', async () => {
  const res = await api(w, 'planner').get(`${base()}/exports/readings.csv`);
  expect(res.status).toBe(200);
  expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
  expect(res.headers['content-disposition']).toMatch(
    /^attachment; filename="readings-\d{4}-\d{2}-\d{2}-\d{4}-\d{2}-\d{2}\.csv"$/,
  );
  expect(res.text).toContain('\r\n');
  const rows = parseCsv(res.text.trimEnd());
  const [header, ...body] = rows;
  expect(header.slice(0, 7)).toEqual([
    'reading_id',
    'round_id',
    'route',
    'technician',
    'device_time',
    'received_at',
    'instrument_tag',
  ]);
  // two rounds of every demo instrument
  expect(body.length).toBe(2 * Object.keys(w.sigma).length);
  const col = (name: string) => header.indexOf(name);
  const noteOf = (tag: string) =>
    body.find((r) => r[col('instrument_tag')] === tag && r[col('note')] !== '')![col('note')];
  expect(noteOf('TI-102A')).toBe(`'=HYPERLINK("http://evil.example/x","click")`);
  expect(noteOf('TI-102B')).toBe(`'+SUM(1,2)`);
  expect(noteOf('PI-102')).toBe(`'-2+3`);
  expect(noteOf('FI-101')).toBe(`'@cmd`);
  expect(noteOf('TI-201')).toBe(`'\tindented`);
  expect(noteOf('TI-202')).toBe(`'\rreturn`);
  expect(noteOf('JI-601')).toBe('plain, with a comma and "quotes"');
  assertNeutral(rows);

  const neg = body.find((r) => r[col('instrument_tag')] === 'PI-203' && r[col('value_typed')].startsWith('-'))!;
  expect(neg[col('value_typed')]).toBe('-0.05');
  expect(neg[col('reference')]).toBe('gauge');
  const ti = body.find((r) => r[col('instrument_tag')] === 'TI-102A' && r[col('note')] !== '')!;
  expect(ti[col('si_unit')]).toBe('K');
  expect(Number(ti[col('value_si')])).toBeGreaterThan(700);
  expect(Number(ti[col('reconciled_si')])).toBeGreaterThan(700);
  expect(ti[col('suspect')]).toBe('true');
  expect(ti[col('route')]).toBe('turbine-hall');
  expect(ti[col('technician')]).toBe('Robin Aske');
});

test('readings.csv: from/to select by device time; bad ranges are refused', async () => {
  const none = await api(w, 'engineer').get(`${base()}/exports/readings.csv?from=2000-01-01&to=2000-01-02`);
  expect(none.status).toBe(200);
  expect(parseCsv(none.text.trimEnd())).toHaveLength(1);
  expect((await api(w, 'engineer').get(`${base()}/exports/readings.csv?from=2000-01-02&to=2000-01-01`)).status).toBe(
    400,
  );
  expect((await api(w, 'engineer').get(`${base()}/exports/readings.csv?from=soon`)).status).toBe(400);
  expect((await api(w, 'tech').get(`${base()}/exports/readings.csv`)).status).toBe(403);
  expect((await api(w, 'brackPlanner').get(`${base()}/exports/readings.csv`)).status).toBe(404);
});

test('work-orders.csv: one row per order; a cancel reason written as a formula comes out as text', async () => {
  const list = await api(w, 'planner').get(`${base()}/work-orders?tag=TI-102A`);
  const id = list.body.items[0].id as string;
  const reason = `=cmd|' /C calc'!A0`;
  expect((await api(w, 'planner').post(`${base()}/work-orders/${id}/cancel`, { reason })).status).toBe(200);
  const res = await api(w, 'engineer').get(`${base()}/exports/work-orders.csv`);
  expect(res.status).toBe(200);
  expect(res.headers['content-disposition']).toBe('attachment; filename="work-orders.csv"');
  const rows = parseCsv(res.text.trimEnd());
  const [header, ...body] = rows;
  expect(header).toEqual([
    'number',
    'kind',
    'status',
    'priority',
    'title',
    'instrument_tag',
    'equipment',
    'assignee',
    'due_date',
    'scheduled_for',
    'opened_at',
    'closed_at',
    'findings',
    'reopen_count',
    'cancel_reason',
    'merged_into',
  ]);
  const row = body.find((r) => r[0] === 'WO-0001')!;
  // TI-102A and its twin are one group to the balances (|ρ| ≥ 0.95): one check-group order, its target the first tag
  expect(row.slice(0, 4)).toEqual(['WO-0001', 'check-group', 'cancelled', '1']);
  expect(row[header.indexOf('cancel_reason')]).toBe(`'${reason}`);
  expect(row[header.indexOf('instrument_tag')]).toBe('TI-102A');
  assertNeutral(rows);
});
