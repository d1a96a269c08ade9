/**
 * What the round check tells the technician: the re-take list in walking order, the suspects with
 * what the rest of the plant says they should read, the balance lines, dismissals, and re-takes
 * that supersede the reading (append-only) and clear the check.
 *
 * Faults are injected on the demo unit's design point (every balance closes with IAPWS-IF97); a
 * reading biased by several standard uncertainties is a gross error in the sense of VDI 2048
 * part 1 (the per-measurement test at 95 %), and the estimate the rest of the plant gives must lie
 * within its stated spread of the design value.
 */
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { checkRound, type RoundCheck } from '@/shared/round-check';
import { loadRoundCheckInput } from '@/offline/round-check';
import { python } from '../cycle/helpers';
import { BARO_PA, demoDevice, designTyped, pushed, walk, type Device, type Walked } from './helpers';

const DESIGN_SI = Object.fromEntries(demoDesignReadings(BARO_PA).map((r) => [r.instrumentTag, r.valueSI]));

async function check(d: Device, roundId: string): Promise<RoundCheck> {
  const load = await loadRoundCheckInput(d.store, roundId, { now: d.clock.now() });
  if (!load.ok) throw new Error(load.problem);
  return checkRound(load.input);
}

/** boiler house and condenser at design (finished), then the turbine hall with the given changes (in progress) */
async function turbineHallWith(
  changes: Record<string, number>,
): Promise<{ d: Device; th: Walked; typed: Record<string, number> }> {
  const d = await demoDevice();
  const typed = designTyped();
  await walk(d, 'boiler-house', typed, { finish: true });
  await walk(d, 'condenser-cooling-water', typed, { finish: true });
  const th = await walk(d, 'turbine-hall', { ...typed, ...changes });
  return { d, th, typed };
}

describe('the re-take list', () => {
  test('a temperature 6 K high that only the balances can see: named first, at its stop, with the estimate of the rest of the plant', async () => {
    const base = designTyped();
    const { d, th } = await turbineHallWith({ 'TI-206': base['TI-206'] + 6 });
    const r = await check(d, th.roundId);
    expect(r.clean).toBe(false);
    expect(r.retakes.map((i) => i.tag)).toEqual(['TI-206']);
    expect(r.retakes[0]).toMatchObject({
      stop: 2,
      stopName: 'LP extraction and LP heater',
      readingId: th.readingIds['TI-206'],
      kind: 'gross-error',
      dismissed: null,
    });
    // TI-206's corrections correlate with FI-202's, TI-302's and PI-501's by |ρ| ≥ 0.95 (shared/reconcile GROUP_CORRELATION): the group is said
    expect(r.retakes[0].line).toBe(
      'Stop 3, LP extraction and LP heater: TI-206 — reads about 6 K high against the LP feedwater heater and deaerator balances (or FI-202, TI-302 and PI-501: the balances cannot tell them apart)',
    );
    expect(r.suspects.map((s) => s.tag)).toEqual(['TI-206']);
    const s = r.suspects[0];
    // the estimate lies within its 2σ spread of the design value (the design point closes every balance)
    expect(Math.abs(s.estimate! - DESIGN_SI['TI-206'])).toBeLessThan(2 * s.estimateSigma!);
    expect(s.readingText).toBe(`${(base['TI-206'] + 6).toFixed(2)} °C`);
    expect(s.estimateText).toMatch(/^130\.\d °C ± \d\.\d K$/);
    const da = r.balances.find((l) => l.equipmentId === 'da')!;
    expect(da.status).toBe('open');
    expect(da.text).toMatch(/^The Deaerator energy balance does not close/);
    expect(r.balances.find((l) => l.equipmentId === 'gen')!.status).toBe('closes');
    expect(r.modelVersion).toBe(demoUnit.version);
  });

  test('two faults on one route come in walking order, not in order of severity', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'boiler-house', typed, { finish: true });
    await walk(d, 'turbine-hall', typed, { finish: true });
    const cw = await walk(d, 'condenser-cooling-water', {
      ...typed,
      'TI-403A': typed['TI-403A'] + 6,
      'TI-401': typed['TI-401'] + 6,
    });
    const r = await check(d, cw.roundId);
    expect(r.suspects.map((s) => s.tag).sort()).toEqual(['TI-401', 'TI-403A']);
    // PI-402 and TI-401 are one group (the condenser's saturation holds them together, |ρ| ≥ 0.95): both are re-taken
    expect(r.retakes.map((i) => [i.stop, i.tag])).toEqual([
      [0, 'PI-402'],
      [0, 'TI-401'],
      [3, 'TI-403A'],
    ]);
    expect(r.retakes[0].line).toMatch(/PI-402 — cannot be told apart from TI-401 by the balances: re-take both$/);
    // the twin is not sent back: the balances cleared it
    expect(r.retakes.map((i) => i.tag)).not.toContain('TI-403B');
  });

  test('a flagged instrument of another round is listed apart, without a stop on this route', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    const bh = await walk(d, 'boiler-house', { ...typed, 'TI-302': typed['TI-302'] + 10 }, { finish: true });
    const cw = await walk(d, 'condenser-cooling-water', typed, { finish: true });
    const th = await walk(d, 'turbine-hall', typed);
    const r = await check(d, th.roundId);
    // TI-206 on this route is in TI-302's group (|ρ| ≥ 0.95): it is re-taken too, saying why
    expect(r.retakes.map((i) => [i.tag, i.line])).toEqual([
      [
        'TI-206',
        'Stop 3, LP extraction and LP heater: TI-206 — cannot be told apart from TI-302 by the balances: re-take both',
      ],
    ]);
    // the rest of the group, read on other rounds, is listed apart, TI-302 first
    expect(r.elsewhere.map((i) => [i.tag, i.roundId, i.stop, i.routeName])).toEqual([
      ['TI-302', bh.roundId, null, 'Boiler house'],
      ['FI-202', bh.roundId, null, 'Boiler house'],
      ['PI-501', cw.roundId, null, 'Condenser and cooling water'],
    ]);
    expect(r.elsewhere[0].line).toMatch(
      /^TI-302 \(Boiler house round\) — reads about 10 K high against the deaerator balance \(or FI-202, TI-206 and PI-501: the balances cannot tell them apart\)$/,
    );
  });

  test('a saturated point read 6 K hot: the estimate is the IAPWS-IF97 saturation temperature at the reconciled pressure (python3-iapws)', async () => {
    const d = await demoDevice();
    const typed = designTyped();
    await walk(d, 'turbine-hall', typed, { finish: true });
    await walk(d, 'condenser-cooling-water', typed, { finish: true });
    const bh = await walk(d, 'boiler-house', { ...typed, 'TI-301': typed['TI-301'] + 6 });
    const r = await check(d, bh.roundId);
    expect(r.retakes.map((i) => i.tag)).toEqual(['TI-301']);
    expect(r.retakes[0].line).toMatch(
      /^Stop 3, Deaerator: TI-301 — reads about 6 K high against saturation at deaerator outlet/,
    );
    const p = r.analysis.statePoints.find((s) => s.id === 'dao')!.reconciled.p!;
    const tsat = python<number>(`from iapws import IAPWS97; print(IAPWS97(P=${p / 1e6}, x=0).T)`);
    expect(r.suspects[0].estimate!).toBeCloseTo(tsat, 6);
  });
});

describe('re-takes and dismissals', () => {
  test('a re-take supersedes the reading (both kept, both queued for the server) and the check comes out clean', async () => {
    const { d, th, typed } = await turbineHallWith({ 'TI-206': designTyped()['TI-206'] + 6 });
    const retake = await d.actions.recordReading({
      roundId: th.roundId,
      instrumentTag: 'TI-206',
      valueTyped: typed['TI-206'],
      unit: '°C',
      supersedes: th.readingIds['TI-206'],
    });
    const r = await check(d, th.roundId);
    expect(r.clean).toBe(true);
    expect(r.complete).toBe(true);
    expect(r.retakes).toEqual([]);
    expect(r.suspects).toEqual([]);
    expect(r.balances.every((l) => l.status === 'closes')).toBe(true);
    expect(r.assembled.sources['TI-206'].readingId).toBe(retake.id);
    const all = (await d.store.roundReadings(th.roundId, { all: true })).filter((x) => x.tag === 'TI-206');
    expect(all.map((x) => [x.id, x.supersedes])).toEqual([
      [th.readingIds['TI-206'], null],
      [retake.id, th.readingIds['TI-206']],
    ]);
    const out = (await pushed(d)).readings.filter(
      (x) => x.roundId === th.roundId && (x.id === retake.id || x.id === th.readingIds['TI-206']),
    );
    expect(out).toHaveLength(2);
  });

  test('a dismissal with a reason marks the item and travels with the round; a later re-take makes it lapse', async () => {
    const base = designTyped();
    const { d, th } = await turbineHallWith({ 'TI-206': base['TI-206'] + 6 });
    await d.actions.dismissSuspect(th.roundId, 'TI-206', 'Thermometer well known to read high, work order open');
    let r = await check(d, th.roundId);
    expect(r.retakes[0].dismissed).toBe('Thermometer well known to read high, work order open');
    // the deaerator balance stays open: dismissing a flag does not make the round clean
    expect(r.clean).toBe(false);
    const round = (await pushed(d)).rounds.find((x) => x.id === th.roundId)!;
    expect(round.dismissals).toEqual([
      expect.objectContaining({
        tag: 'TI-206',
        flag: 'suspect',
        readingId: th.readingIds['TI-206'],
        note: 'Thermometer well known to read high, work order open',
      }),
    ]);
    await d.actions.recordReading({
      roundId: th.roundId,
      instrumentTag: 'TI-206',
      valueTyped: base['TI-206'] + 6.5,
      unit: '°C',
      supersedes: th.readingIds['TI-206'],
    });
    r = await check(d, th.roundId);
    expect(r.retakes.map((i) => [i.tag, i.dismissed])).toEqual([['TI-206', null]]);
  });
});
