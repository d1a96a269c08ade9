/**
 * Same answer on both sides. The device path is the one the round-check screen runs: the device store
 * (sql.js, the SQLite engine family of expo-sqlite's web build) → offline/round-check loadRoundCheckInput →
 * shared/round-check checkRound. The server path starts from what the device pushes, stores value_si
 * as the server's push does (server/sync/push.ts: gauge and vacuum readings against the round's
 * latest barometer reading, else the site's elevation through the ICAO standard atmosphere), and
 * runs the same check through the row adapter (shared/round-check roundsFromRows). Findings, suspects,
 * estimates and figures must agree to 1e-9 relative; the model version used must be the one the
 * server published with the unit.
 *
 * server/analysis exposes its analysis only as a database job (runAnalysisJob over a TypeORM
 * DataSource), so here the server side is the plain shared code on the DB-shaped inputs; the
 * browser test tests/e2e/round-check.test.ts holds the phone against the real server's stored
 * analysis (GET /api/sites/:siteId/rounds/:roundId/analysis).
 */
import { demoUnit } from '@/demo/unit';
import type { SyncInstrument } from '@/shared/api/sync';
import { effectiveModel } from '@/shared/cycle';
import { checkRound, type RoundCheck } from '@/shared/round-check';
import { loadRoundCheckInput } from '@/offline/round-check';
import { SITE, demoDevice, demoPull, designTyped, differences, serverSideInput, walk, type Device } from './helpers';

type Case = {
  name: string;
  /** instrument rows changed by an admin before the rounds (the device pulls the same rows the server holds) */
  edits?: Record<string, Partial<SyncInstrument>>;
  expectOutOfService?: string[];
  roundCheck: string;
  faults: Record<string, Record<string, (v: number) => number>>;
  retake?: string;
  expectSuspects: string[];
};

const CASES: Case[] = [
  { name: 'all at design', roundCheck: 'turbine-hall', faults: {}, expectSuspects: [] },
  {
    name: 'LP heater outlet thermometer 6 K high (turbine hall)',
    roundCheck: 'turbine-hall',
    faults: { 'turbine-hall': { 'TI-206': (v) => v + 6 } },
    expectSuspects: ['TI-206'],
  },
  {
    name: 'the same, re-taken at design',
    roundCheck: 'turbine-hall',
    faults: { 'turbine-hall': { 'TI-206': (v) => v + 6 } },
    retake: 'TI-206',
    expectSuspects: [],
  },
  {
    name: 'cooling-water outlet RTD 6 K high (condenser round)',
    roundCheck: 'condenser-cooling-water',
    faults: { 'condenser-cooling-water': { 'TI-403A': (v) => v + 6 } },
    expectSuspects: ['TI-403A'],
  },
  {
    name: 'main steam flow 10 % low (boiler house)',
    roundCheck: 'boiler-house',
    faults: { 'boiler-house': { 'FI-101': (v) => v * 0.9 } },
    expectSuspects: ['FI-101'],
  },
  {
    name: 'make-up water 10 K high on the boiler house, checked from the turbine hall',
    roundCheck: 'turbine-hall',
    faults: { 'boiler-house': { 'TI-302': (v) => v + 10 } },
    expectSuspects: ['TI-302'],
  },
  {
    name: 'an admin put TI-206 out of service and class 2 on TI-204 (the device pulled the rows)',
    roundCheck: 'turbine-hall',
    edits: {
      'TI-206': { status: 'out-of-service' },
      'TI-204': { accuracy: { kind: 'iec60584', type: 'K', class: 2, resolution: 0.5 } },
    },
    faults: { 'turbine-hall': { 'TI-206': (v) => v + 6 } },
    expectSuspects: [],
    expectOutOfService: ['TI-206'],
  },
];

function rowsOf(c: Case): SyncInstrument[] {
  return demoPull().instruments.map((i) =>
    c.edits?.[i.tag] ? { ...i, ...c.edits[i.tag], rowVersion: 2, syncVersion: 2 } : i,
  );
}

async function both(c: Case): Promise<{ device: RoundCheck; server: RoundCheck; d: Device }> {
  const d = await demoDevice();
  if (c.edits)
    await d.store.applyPull(SITE, { ...demoPull(), cursor: 2, units: [], routes: [], instruments: rowsOf(c) });
  const typed = designTyped();
  const order = ['boiler-house', 'condenser-cooling-water', 'turbine-hall']
    .filter((k) => k !== c.roundCheck)
    .concat(c.roundCheck);
  let roundId = '';
  let walked: Awaited<ReturnType<typeof walk>> | null = null;
  for (const k of order) {
    const t = { ...typed };
    for (const [tag, f] of Object.entries(c.faults[k] ?? {})) t[tag] = Number(f(t[tag]).toFixed(2));
    walked = await walk(d, k, t, { finish: k !== c.roundCheck });
    roundId = walked.roundId;
  }
  if (c.retake) {
    d.clock.advance(60_000);
    const spec = (await d.store.roundReadings(roundId)).find((r) => r.tag === c.retake)!;
    await d.actions.recordReading({
      roundId,
      instrumentTag: c.retake,
      valueTyped: typed[c.retake],
      unit: spec.unit,
      reference: spec.reference,
      supersedes: walked!.readingIds[c.retake],
    });
  }
  // finish the checked round too: the server checks it at its finish time, the device likewise
  d.clock.advance(60_000);
  const finished = await d.actions.finishRound(roundId);
  const load = await loadRoundCheckInput(d.store, roundId);
  if (!load.ok) throw new Error(load.problem);
  const device = checkRound(load.input);
  const server = checkRound(await serverSideInput(d, roundId, Date.parse(finished.finishedAt!), rowsOf(c)));
  return { device, server, d };
}

describe('the phone and the server give the same round check', () => {
  test.each(CASES)('$name', async (c) => {
    const { device, server } = await both(c);
    expect(device.suspects.map((s) => s.tag)).toEqual(c.expectSuspects);
    expect(differences(device.analysis.findings, server.analysis.findings)).toEqual([]);
    expect(differences(device.analysis.reconciliation, server.analysis.reconciliation)).toEqual([]);
    expect(differences(device.analysis.instruments, server.analysis.instruments)).toEqual([]);
    expect(differences(device.analysis.performance, server.analysis.performance)).toEqual([]);
    expect(differences(device.analysis.balances, server.analysis.balances)).toEqual([]);
    expect(differences(device.suspects, server.suspects)).toEqual([]);
    expect(device.retakes.map((i) => i.line)).toEqual(server.retakes.map((i) => i.line));
    expect(device.balances).toEqual(server.balances);
    expect(device.fingerprint).toBe(server.fingerprint);
    // both used the effective version: the published model with the instrument rows; rows that
    // agree with the model keep the version the server published with the unit
    const effective = effectiveModel(demoUnit, rowsOf(c));
    expect(device.modelVersion).toBe(effective.version);
    expect(server.modelVersion).toBe(effective.version);
    if (c.edits) expect(effective.version).not.toBe(demoUnit.version);
    else expect(device.modelVersion).toBe(demoPull().units[0].modelVersion);
    expect(effective.outOfService).toEqual(c.expectOutOfService ?? []);
    for (const tag of c.expectOutOfService ?? []) {
      expect(device.analysis.instruments.map((i) => i.tag)).not.toContain(tag);
    }
    if (c.edits?.['TI-204']) {
      // IEC 60584-1 class 2, type K: ±2.5 K or 0.0075·|t| above 333 °C (a uniform bound, σ = a/√3, GUM 4.3.7)
      const ti204 = device.analysis.instruments.find((i) => i.tag === 'TI-204')!;
      expect(ti204.sigma).toBeGreaterThan(2.5 / Math.sqrt(3) - 1e-9);
    }
  });

  test('the comparison can fail: one reading 1e-6 relative off changes figures beyond 1e-9', async () => {
    const { device, d } = await both(CASES[0]);
    const finished = (await d.store.listRounds({}))[0];
    const input = await serverSideInput(d, finished.id, Date.parse(finished.finishedAt!));
    const r = input.round.readings.find((x) => x.tag === 'TI-204')!;
    r.valueSI = r.valueSI! * (1 + 1e-6);
    const nudged = checkRound(input);
    expect(differences(device.analysis.performance, nudged.analysis.performance).length).toBeGreaterThan(0);
  });
});
