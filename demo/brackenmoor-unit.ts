/**
 * The second demo site's small unit: a packaged shell-and-drum boiler of the invented Brackenmoor
 * Mills raising saturated steam for the mill (no turbine). Enough instruments for a short round and
 * for tests that need another site's route.
 */
import type { CycleModelInput } from '../shared/cycle/model';
import { modelVersion, type CycleModel } from '../shared/cycle/model';

const BAR = 1e5;
const C0 = 273.15;

const INPUT: Omit<CycleModelInput, 'version'> = {
  id: 'brackenmoor-b1',
  name: 'Brackenmoor Boiler House — Boiler 1 (Brackenmoor Mills)',
  points: [
    { id: 'fw', label: 'Feedwater to boiler', phase: 'liquid', nominal: { p: 12 * BAR, T: 105 + C0, m: 2.5 } },
    { id: 'drum', label: 'Steam to mill', phase: 'saturated-vapour', nominal: { p: 10 * BAR, m: 2.5 } },
  ],
  equipment: [
    { id: 'boiler', kind: 'boiler', label: 'Boiler 1', criticality: 3, ports: { feedIn: 'fw', steamOut: 'drum' } },
    { id: 'drum', kind: 'drum', label: 'Boiler 1 steam space', criticality: 3, ports: { steam: 'drum' } },
  ],
  instruments: [
    {
      tag: 'PI-101',
      label: 'Boiler steam pressure',
      device: 'Bourdon gauge',
      quantity: 'pressure',
      point: 'drum',
      pressureReference: 'gauge',
      range: { min: 0, max: 16 * BAR },
      accuracy: { kind: 'en837', class: 1.6, spanPa: 16 * BAR, resolution: 0.2 * BAR },
      unit: 'bar',
    },
    {
      tag: 'TI-101',
      label: 'Feedwater temperature',
      device: 'bimetal thermometer',
      quantity: 'temperature',
      point: 'fw',
      range: { min: C0, max: 160 + C0 },
      accuracy: { kind: 'percentSpan', percent: 1, span: 160, basis: 'tolerance', resolution: 1 },
      unit: '°C',
    },
    {
      tag: 'FI-101',
      label: 'Steam flow to mill',
      device: 'vortex meter',
      quantity: 'massFlow',
      point: 'drum',
      range: { min: 0, max: (15 * 1000) / 3600 },
      accuracy: { kind: 'percentReading', percent: 1.5, basis: 'u95' },
      unit: 't/h',
    },
    {
      tag: 'LI-101',
      label: 'Boiler water level',
      device: 'level gauge glass',
      quantity: 'level',
      equipment: 'drum',
      range: { min: 0, max: 1 },
      accuracy: { kind: 'percentSpan', percent: 2, span: 1, basis: 'tolerance', resolution: 0.01 },
      unit: '%',
    },
  ],
};

export const brackenmoorUnit: CycleModel = Object.freeze({ ...INPUT, version: modelVersion(INPUT) }) as CycleModel;
