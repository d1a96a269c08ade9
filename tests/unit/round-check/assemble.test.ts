/**
 * Which readings the round check uses: this round's current readings, and for the instruments not
 * on its route the most recent reading from other rounds of the unit kept on the device within the
 * last 4 h (project rule, stated on the round-check screen). Device time decides "within 4 h";
 * values are the design point of the demo unit typed as the gauges show it.
 */
import { assembleRoundCheck, RoundCheckInputError, checkRound, type RoundCheckInput } from '@/shared/round-check';
import { loadRoundCheckInput } from '@/offline/round-check';
import { demoDevice, designTyped, ROUTE_NAME, TEMPLATE, walk, type Device } from './helpers';

const HOUR = 3.6e6;

async function inputOf(d: Device, roundId: string): Promise<RoundCheckInput> {
  const load = await loadRoundCheckInput(d.store, roundId, { now: d.clock.now() });
  if (!load.ok) throw new Error(load.problem);
  return load.input;
}

const tagsOf = (key: string) => TEMPLATE[key].stops.flatMap((s) => s.readings.map((r) => r.tag));

describe('the unit-level readings of a round', () => {
  test('instruments not on the route come from the other routes walked within 4 h; the route’s own from this round', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    const bh = await walk(d, 'boiler-house', typed, { finish: true });
    const cw = await walk(d, 'condenser-cooling-water', typed, { finish: true });
    const th = await walk(d, 'turbine-hall', typed);
    const a = assembleRoundCheck(await inputOf(d, th.roundId));
    expect(a.borrowed.map((b) => [b.roundId, b.routeName])).toEqual([
      [bh.roundId, ROUTE_NAME['boiler-house']],
      [cw.roundId, ROUTE_NAME['condenser-cooling-water']],
    ]);
    // the site barometer (PI-001) is not a cycle instrument: it is not borrowed
    expect(a.borrowed[0].tags.sort()).toEqual(
      tagsOf('boiler-house')
        .filter((t) => t !== 'PI-001')
        .sort(),
    );
    expect(a.borrowed[1].tags.sort()).toEqual(tagsOf('condenser-cooling-water').sort());
    for (const t of tagsOf('turbine-hall'))
      expect(a.sources[t]).toEqual({ roundId: th.roundId, readingId: th.readingIds[t], own: true });
    expect(a.notRead).toEqual([]);
  });

  test('a round older than 4 h is not used: its instruments are missing and the balances that need them say so', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'condenser-cooling-water', typed, { finish: true });
    d.clock.advance(5 * HOUR);
    await walk(d, 'boiler-house', typed, { finish: true });
    const th = await walk(d, 'turbine-hall', typed);
    const roundCheck = checkRound(await inputOf(d, th.roundId));
    const cwTags = tagsOf('condenser-cooling-water');
    expect(roundCheck.assembled.notRead.map((n) => n.tag).sort()).toEqual([...cwTags].sort());
    expect(new Set(roundCheck.assembled.notRead.map((n) => n.routeName))).toEqual(
      new Set([ROUTE_NAME['condenser-cooling-water']]),
    );
    expect(roundCheck.complete).toBe(false);
    const condenser = roundCheck.balances.find((l) => l.equipmentId === 'cond')!;
    expect(condenser.status).toBe('incomplete');
    expect(condenser.missing).toEqual(expect.arrayContaining(['PI-401', 'PI-402', 'FI-401', 'TI-402', 'TI-403A']));
    expect(condenser.text).toMatch(/^Condenser: .* cannot be formed yet — no reading of /);
  });

  test('of two rounds of the same route, the later one is used', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'boiler-house', typed, { finish: true });
    const later = await walk(d, 'boiler-house', { ...typed, 'TI-302': typed['TI-302'] + 0.5 }, { finish: true });
    await walk(d, 'condenser-cooling-water', typed, { finish: true });
    const th = await walk(d, 'turbine-hall', typed);
    const a = assembleRoundCheck(await inputOf(d, th.roundId));
    expect(a.sources['TI-302']).toEqual({ roundId: later.roundId, readingId: later.readingIds['TI-302'], own: false });
    // °C → K (ITS-90: T/K = t/°C + 273.15)
    expect(a.readings.find((r) => r.instrumentTag === 'TI-302')!.valueSI).toBeCloseTo(
      typed['TI-302'] + 0.5 + 273.15,
      9,
    );
  });

  test('an instrument of this route that this round skipped stays missing even when another round read it', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'turbine-hall', typed, { finish: true });
    const th = await walk(d, 'turbine-hall', typed, { skip: ['TI-206'] });
    const a = assembleRoundCheck(await inputOf(d, th.roundId));
    expect(a.sources['TI-206']).toBeUndefined();
    expect(a.notRead.find((n) => n.tag === 'TI-206')).toEqual({
      tag: 'TI-206',
      routeName: ROUTE_NAME['turbine-hall'],
      onThisRoute: true,
    });
  });

  test('earlier rounds of the same route are the stuck-value history, oldest first', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'turbine-hall', typed, { finish: true });
    await walk(d, 'turbine-hall', { ...typed, 'TI-204': typed['TI-204'] + 1 }, { finish: true });
    const th = await walk(d, 'turbine-hall', typed);
    const a = assembleRoundCheck(await inputOf(d, th.roundId));
    const prev = a.context.previousRounds!;
    expect(prev).toHaveLength(2);
    const t204 = (i: number) => prev[i].readings.find((r) => r.instrumentTag === 'TI-204')!.valueSI;
    expect(t204(1) - t204(0)).toBeCloseTo(1, 9);
  });

  test('bad inputs are refused with the field, the value and the limit', async () => {
    const d = await demoDevice();
    const th = await walk(d, 'turbine-hall', designTyped());
    const input = await inputOf(d, th.roundId);
    expect(() => assembleRoundCheck({ ...input, at: Number.NaN })).toThrow(RoundCheckInputError);
    expect(() => assembleRoundCheck({ ...input, at: Number.NaN })).toThrow(/^at: must be a time in ms/);
    expect(() => assembleRoundCheck({ ...input, windowHours: -1 })).toThrow(
      /windowHours: must be a positive number of hours \(got -1\)/,
    );
    const bad = { ...input.round, readings: [{ ...input.round.readings[0], valueSI: Number.NaN }] };
    expect(() => assembleRoundCheck({ ...input, round: bad })).toThrow(
      /round\.readings\.0\.valueSI: PI-102: must be a finite SI value or null/,
    );
  });
});
