/**
 * One instrument master (shared/cycle/instrument-master.ts) on the phone: the pulled instrument
 * rows over the cycle model. Rows that agree with the model keep its published version; an edit of
 * what the physics reads gives a new one; an out-of-service instrument leaves the model (its twin
 * loses the twin) and the round on the device still shows it at its stop (offline/round.ts).
 * Tolerances: IEC 60751:2008 class B ±(0.30 + 0.005·|t|) °C (from memory of the standard's table 1),
 * σ = a/√3 (GUM, JCGM 100:2008, 4.3.7).
 */
import { demoUnit } from '@/demo/unit';
import type { SyncInstrument } from '@/shared/api/sync';
import { effectiveModel, validateModel } from '@/shared/cycle';
import { sigmaFor } from '@/shared/uncertainty';
import { flagsFor, loadRound } from '@/offline/round';
import { SITE, demoDevice, demoPull, designTyped, walk } from './helpers';

const rows = (edits: Record<string, Partial<SyncInstrument>> = {}) =>
  demoPull().instruments.map((i) => (edits[i.tag] ? { ...i, ...edits[i.tag], syncVersion: 2, rowVersion: 2 } : i));

test('rows that agree with the model keep the published version', () => {
  const e = effectiveModel(demoUnit, rows());
  expect(e.version).toBe(demoUnit.version);
  expect(e.outOfService).toEqual([]);
});

test('a class change replaces the accuracy and moves the version; the result is a valid model', () => {
  const e = effectiveModel(
    demoUnit,
    rows({ 'TI-205': { accuracy: { kind: 'iec60751', class: 'B', resolution: 0.2 } } }),
  );
  expect(e.version).not.toBe(demoUnit.version);
  const ti = e.model.instruments.find((i) => i.tag === 'TI-205')!;
  expect(ti.accuracy).toEqual({ kind: 'iec60751', class: 'B', resolution: 0.2 });
  // at 40 °C: a = 0.30 + 0.005·40 = 0.50 K; σ = √((0.5/√3)² + 0.2²/12)
  expect(sigmaFor(ti.accuracy, 313.15)).toBeCloseTo(Math.sqrt((0.5 / Math.sqrt(3)) ** 2 + 0.04 / 12), 12);
  const v = validateModel(e.model);
  expect(v.ok).toBe(true);
  if (v.ok) expect(v.model.version).toBe(e.version);
});

test('an out-of-service instrument leaves the model; the twin naming it loses the twin', () => {
  const withTwin = demoUnit.instruments.find((i) => i.twin)!;
  const e = effectiveModel(demoUnit, rows({ [withTwin.twin!]: { status: 'out-of-service' } }));
  expect(e.outOfService).toEqual([withTwin.twin]);
  expect(e.model.instruments.map((i) => i.tag)).not.toContain(withTwin.twin);
  expect(e.model.instruments.find((i) => i.tag === withTwin.tag)!.twin).toBeUndefined();
  expect(validateModel(e.model).ok).toBe(true);
  // a row that is not a valid accuracy specification leaves the model's
  const bad = effectiveModel(demoUnit, rows({ 'TI-205': { accuracy: { kind: 'iec60751', class: 'Z' } } }));
  expect(bad.model.instruments.find((i) => i.tag === 'TI-205')!.accuracy).toEqual(
    demoUnit.instruments.find((i) => i.tag === 'TI-205')!.accuracy,
  );
});

test('on the device: an out-of-service instrument is out of the model, keeps its label and its band check at the stop', async () => {
  const d = await demoDevice();
  await d.store.applyPull(SITE, {
    ...demoPull(),
    cursor: 2,
    units: [],
    routes: [],
    instruments: rows({ 'TI-206': { status: 'out-of-service' } }),
  });
  const { roundId } = await walk(d, 'turbine-hall', designTyped(), { finish: false });
  const data = (await loadRound(d.store, roundId, SITE))!;
  expect(data.model!.instruments.map((i) => i.tag)).not.toContain('TI-206');
  expect(data.instruments['TI-206'].status).toBe('out-of-service');
  expect(data.labels['TI-206']).toBe('LP heater condensate outlet temperature');
  const spec = data.template.stops.flatMap((s) => s.readings).find((r) => r.tag === 'TI-206')!;
  // the route's band is 120–138 °C: 150 °C is outside it
  expect(flagsFor(data, spec, 150 + 273.15).map((f) => f.kind)).toContain('band');
});
