/**
 * The demo unit of the invented demo site "Fernhallow Works" (Fernhallow Heat & Power, a
 * cogeneration plant). Everything here is invented: a drum boiler with superheater, an HP turbine
 * section exhausting at 13 bar(a) into a header that feeds the site's process steam, the
 * deaerator (through a pressure-reducing valve) and the LP turbine section; one LP extraction to a
 * closed LP feedwater heater whose drain cascades to the condenser; a surface condenser on cooling
 * water; condensate and boiler feed pumps; process returns and make-up into the deaerator; one
 * generator on both sections.
 *
 * designPoint() derives every dependent design value from a handful of chosen ones with
 * IAPWS-IF97 (shared/steam), so that every mass and energy balance closes: section outlets from
 * their isentropic efficiencies, pump outlets likewise, heater outlets from TTD and DCA, the
 * extraction and deaerator steam flows from the heater and deaerator energy balances, the
 * cooling-water flow from the condenser duty, the electrical output from the section work.
 */
import { fromSI, type PressureRef, type Unit } from '../shared/units';
import { ph, ps, pt, px, tsat } from '../shared/steam';
import type { AccuracySpec } from '../shared/uncertainty';
import { modelVersion, type CycleModel, type CycleModelInput, type Instrument } from '../shared/cycle/model';
import type { RoundReading } from '../shared/cycle/types';

const C0 = 273.15;
const BAR = 1e5;
const TPH = 1000 / 3600; // kg/s per t/h

/** The chosen design values (SI: Pa absolute, K, kg/s; efficiencies and differences as stated). */
export interface DesignParameters {
  drumP: number;
  mainSteamP: number;
  mainSteamT: number;
  mainSteamFlow: number;
  hpExhaustP: number;
  hpEfficiency: number;
  processSteamFlow: number;
  deaeratorP: number;
  lpExtractionP: number;
  /** isentropic efficiency, LP inlet → extraction */
  lpEfficiency1: number;
  /** isentropic efficiency, extraction → exhaust */
  lpEfficiency2: number;
  condenserP: number;
  condensatePumpP: number;
  condensatePumpEfficiency: number;
  /** LP heater terminal temperature difference, K */
  heaterTTD: number;
  /** LP heater drain-cooler approach, K */
  heaterDCA: number;
  makeupP: number;
  makeupT: number;
  feedPumpP: number;
  feedPumpEfficiency: number;
  coolingP: number;
  coolingInT: number;
  coolingOutT: number;
  generatorEfficiency: number;
}

export const DESIGN_PARAMETERS: Readonly<DesignParameters> = Object.freeze({
  drumP: 6.8e6,
  mainSteamP: 6.4e6,
  mainSteamT: 485 + C0,
  mainSteamFlow: 30,
  hpExhaustP: 1.3e6,
  hpEfficiency: 0.8,
  processSteamFlow: 9,
  deaeratorP: 0.45e6,
  lpExtractionP: 0.3e6,
  lpEfficiency1: 0.82,
  lpEfficiency2: 0.78,
  condenserP: 9e3,
  condensatePumpP: 1.0e6,
  condensatePumpEfficiency: 0.7,
  heaterTTD: 3,
  heaterDCA: 6,
  makeupP: 0.6e6,
  makeupT: 70 + C0,
  feedPumpP: 7.6e6,
  feedPumpEfficiency: 0.75,
  coolingP: 0.25e6,
  coolingInT: 25 + C0,
  coolingOutT: 35 + C0,
  generatorEfficiency: 0.975,
});

export interface DesignState {
  p: number;
  T: number;
  h: number;
  s: number;
  /** quality where two-phase or saturated, else null */
  x: number | null;
  m: number;
}

export interface DesignPoint {
  parameters: DesignParameters;
  points: Record<string, DesignState>;
  /** electrical output, W */
  power: number;
  /** heat absorbed in boiler and superheater, W */
  boilerHeat: number;
  /** condenser duty, W */
  condenserDuty: number;
  /** design levels (fraction of span) by equipment id */
  levels: Record<string, number>;
}

function state(p: number, h: number, m: number): DesignState {
  const s = ph(p, h);
  return { p, T: s.T, h: s.h, s: s.s, x: s.x, m };
}

/** Every dependent design value from the chosen ones, with IAPWS-IF97. */
export function designPoint(params: Partial<DesignParameters> = {}): DesignPoint {
  const d: DesignParameters = { ...DESIGN_PARAMETERS, ...params };
  const ms = pt(d.mainSteamP, d.mainSteamT);
  // HP section
  const hHpx = ms.h - d.hpEfficiency * (ms.h - ps(d.hpExhaustP, ms.s).h);
  const hpx = ph(d.hpExhaustP, hHpx);
  // LP section, two stage groups
  const hLpe = hpx.h - d.lpEfficiency1 * (hpx.h - ps(d.lpExtractionP, hpx.s).h);
  const lpe = ph(d.lpExtractionP, hLpe);
  const hLpx = lpe.h - d.lpEfficiency2 * (lpe.h - ps(d.condenserP, lpe.s).h);
  // hotwell and condensate pump
  const hw = px(d.condenserP, 0);
  const hCpo = hw.h + (ps(d.condensatePumpP, hw.s).h - hw.h) / d.condensatePumpEfficiency;
  // LP heater outlets from TTD and DCA
  const cpo = ph(d.condensatePumpP, hCpo);
  const tLhf = tsat(d.lpExtractionP) - d.heaterTTD;
  const lhf = pt(d.condensatePumpP, tLhf);
  const tLhd = cpo.T + d.heaterDCA;
  const lhd = pt(d.lpExtractionP, tLhd);
  const mu = pt(d.makeupP, d.makeupT);
  // deaerator: saturated liquid out; steam from its energy balance
  const dao = px(d.deaeratorP, 0);
  const mFw = d.mainSteamFlow;
  const mMu = d.processSteamFlow; // process steam out = returns + make-up in
  const mDas = (mFw * dao.h - (mFw - d.processSteamFlow) * lhf.h - mMu * mu.h) / (hpx.h - lhf.h);
  const mCond = mFw - d.processSteamFlow - mDas;
  // LP heater: extraction flow from its energy balance
  const mExt = (mCond * (lhf.h - cpo.h)) / (lpe.h - lhd.h);
  const mLpx = mCond - mExt;
  // feed pump
  const hFw = dao.h + (ps(d.feedPumpP, dao.s).h - dao.h) / d.feedPumpEfficiency;
  const drum = px(d.drumP, 1);
  // cooling water
  const cwi = pt(d.coolingP, d.coolingInT);
  const cwo = pt(d.coolingP, d.coolingOutT);
  const duty = mLpx * hLpx + mExt * lhd.h - mCond * hw.h;
  const mCw = duty / (cwo.h - cwi.h);
  const shaft = mFw * (ms.h - hpx.h) + mCond * hpx.h - mExt * lpe.h - mLpx * hLpx;

  const points: Record<string, DesignState> = {
    fw: state(d.feedPumpP, hFw, mFw),
    drum: { p: d.drumP, T: drum.T, h: drum.h, s: drum.s, x: 1, m: mFw },
    ms: { p: d.mainSteamP, T: d.mainSteamT, h: ms.h, s: ms.s, x: null, m: mFw },
    hpx: state(d.hpExhaustP, hpx.h, mFw),
    proc: state(d.hpExhaustP, hpx.h, d.processSteamFlow),
    das: state(d.hpExhaustP, hpx.h, mDas),
    das2: state(d.deaeratorP, hpx.h, mDas),
    lpi: state(d.hpExhaustP, hpx.h, mCond),
    lpe: state(d.lpExtractionP, lpe.h, mExt),
    lpx: state(d.condenserP, hLpx, mLpx),
    hw: { p: d.condenserP, T: hw.T, h: hw.h, s: hw.s, x: 0, m: mCond },
    cpo: state(d.condensatePumpP, hCpo, mCond),
    lhf: { p: d.condensatePumpP, T: tLhf, h: lhf.h, s: lhf.s, x: null, m: mCond },
    lhd: { p: d.lpExtractionP, T: tLhd, h: lhd.h, s: lhd.s, x: null, m: mExt },
    mu: { p: d.makeupP, T: d.makeupT, h: mu.h, s: mu.s, x: null, m: mMu },
    dao: { p: d.deaeratorP, T: dao.T, h: dao.h, s: dao.s, x: 0, m: mFw },
    cwi: { p: d.coolingP, T: d.coolingInT, h: cwi.h, s: cwi.s, x: null, m: mCw },
    cwo: { p: d.coolingP, T: d.coolingOutT, h: cwo.h, s: cwo.s, x: null, m: mCw },
  };
  return {
    parameters: d,
    points,
    power: d.generatorEfficiency * shaft,
    boilerHeat: mFw * (ms.h - hFw),
    condenserDuty: duty,
    levels: { drum: 0.5, da: 0.6, cond: 0.45, lph: 0.3 },
  };
}

// ---------------------------------------------------------------------------------------------
// the model

/** 4 significant figures: nominal values are starting guesses, kept short so the model's hash does not hang on the last bit of a float. */
const r4 = (x: number) => Number(x.toPrecision(4));

type InstrumentIn = Omit<Instrument, 'range'> & { range: { min: number; max: number } };

const en837 = (cls: 0.6 | 1 | 1.6, spanPa: number, resolution: number): AccuracySpec => ({
  kind: 'en837',
  class: cls,
  spanPa,
  resolution,
});

function gaugeBar(
  tag: string,
  point: string,
  label: string,
  maxBar: number,
  cls: 0.6 | 1 | 1.6,
  resBar: number,
  twin?: string,
): InstrumentIn {
  return {
    tag,
    label,
    device: 'Bourdon gauge',
    quantity: 'pressure',
    point,
    pressureReference: 'gauge',
    range: { min: 0, max: maxBar * BAR },
    accuracy: en837(cls, maxBar * BAR, resBar * BAR),
    unit: 'bar',
    ...(twin ? { twin } : {}),
  };
}

function thermo(
  tag: string,
  point: string,
  label: string,
  device: string,
  accuracy: AccuracySpec,
  maxC: number,
  twin?: string,
  minC = 0,
): InstrumentIn {
  return {
    tag,
    label,
    device,
    quantity: 'temperature',
    point,
    range: { min: minC + C0, max: maxC + C0 },
    accuracy,
    unit: '°C',
    ...(twin ? { twin } : {}),
  };
}

function flow(
  tag: string,
  point: string,
  label: string,
  device: string,
  accuracy: AccuracySpec,
  maxTph: number,
): InstrumentIn {
  return {
    tag,
    label,
    device,
    quantity: 'massFlow',
    point,
    range: { min: 0, max: maxTph * TPH },
    accuracy,
    unit: 't/h',
  };
}

function level(tag: string, equipment: string, label: string): InstrumentIn {
  return {
    tag,
    label,
    device: 'level gauge glass',
    quantity: 'level',
    equipment,
    range: { min: 0, max: 1 },
    accuracy: { kind: 'percentSpan', percent: 2, span: 1, basis: 'tolerance', resolution: 0.01 },
    unit: '%',
  };
}

/** The Fernhallow Works unit 1 model (input form; `demoUnit` is it with its version). */
function demoModelInput(dp: DesignPoint): Omit<CycleModelInput, 'version'> {
  const P = dp.points;
  const nominal = (id: string, withP = true) => ({
    ...(withP ? { p: r4(P[id].p) } : {}),
    T: r4(P[id].T),
    m: r4(P[id].m),
    ...(P[id].x !== null && P[id].x! > 0 && P[id].x! < 1 ? { x: r4(P[id].x!) } : {}),
  });
  const d = dp.parameters;
  const K1 = (res: number): AccuracySpec => ({ kind: 'iec60584', type: 'K', class: 1, resolution: res });
  const K2 = (res: number): AccuracySpec => ({ kind: 'iec60584', type: 'K', class: 2, resolution: res });
  const rtdA = (res: number): AccuracySpec => ({ kind: 'iec60751', class: 'A', resolution: res });
  const rtdB = (res: number): AccuracySpec => ({ kind: 'iec60751', class: 'B', resolution: res });
  const bimetal = (percent: number, spanK: number, res: number): AccuracySpec => ({
    kind: 'percentSpan',
    percent,
    span: spanK,
    basis: 'tolerance',
    resolution: res,
  });
  const instruments: InstrumentIn[] = [
    // boiler and main steam
    gaugeBar('PI-101', 'drum', 'Drum pressure', 100, 1, 0.5),
    thermo('TI-101', 'drum', 'Drum steam temperature', 'type K thermocouple', K2(1), 400),
    gaugeBar('PI-102', 'ms', 'Main steam pressure at turbine stop valve', 100, 1, 0.5),
    thermo('TI-102A', 'ms', 'Main steam temperature (thermocouple)', 'type K thermocouple', K1(1), 600, 'TI-102B'),
    thermo('TI-102B', 'ms', 'Main steam temperature (RTD)', 'Pt100 RTD', rtdB(1), 600, 'TI-102A'),
    flow('FI-101', 'ms', 'Main steam flow', 'orifice plate', { kind: 'orifice', beta: 0.55, otherPercent: 1.0 }, 150),
    gaugeBar('PI-103', 'fw', 'Boiler feed pump discharge pressure', 160, 1.6, 1),
    thermo('TI-103', 'fw', 'Feedwater temperature to boiler', 'Pt100 RTD', rtdA(0.5), 250),
    flow(
      'FI-102',
      'fw',
      'Feedwater flow to boiler',
      'orifice plate',
      { kind: 'orifice', beta: 0.5, otherPercent: 0.8 },
      150,
    ),
    level('LI-101', 'drum', 'Drum level'),
    // HP exhaust header
    gaugeBar('PI-201', 'hpx', 'HP exhaust pressure', 25, 1, 0.2),
    thermo('TI-201', 'hpx', 'HP exhaust temperature', 'type K thermocouple', K1(1), 400),
    gaugeBar('PI-202', 'proc', 'Process steam header pressure', 25, 1.6, 0.2),
    thermo('TI-202', 'proc', 'Process steam temperature', 'bimetal thermometer', bimetal(1, 400, 2), 400),
    flow(
      'FI-201',
      'proc',
      'Process steam flow to site',
      'orifice plate',
      { kind: 'orifice', beta: 0.6, otherPercent: 1.2 },
      60,
    ),
    thermo('TI-203', 'das2', 'Deaerator steam after reducing valve', 'bimetal thermometer', bimetal(1.5, 400, 2), 400),
    flow(
      'FI-202',
      'das2',
      'Deaerator steam flow',
      'vortex meter',
      { kind: 'percentReading', percent: 1.5, basis: 'u95' },
      20,
    ),
    // LP section and heater
    gaugeBar('PI-203', 'lpe', 'LP extraction pressure', 6, 1, 0.05),
    thermo('TI-204', 'lpe', 'LP extraction temperature', 'type K thermocouple', K1(0.5), 300),
    thermo('TI-205', 'cpo', 'LP heater condensate inlet temperature', 'Pt100 RTD', rtdA(0.2), 150),
    thermo('TI-206', 'lhf', 'LP heater condensate outlet temperature', 'Pt100 RTD', rtdA(0.2), 200),
    thermo('TI-207', 'lhd', 'LP heater drain temperature', 'Pt100 RTD', rtdB(0.5), 150),
    // deaerator and feed pump suction
    gaugeBar('PI-301', 'dao', 'Deaerator pressure', 10, 1, 0.1, 'PI-302'),
    gaugeBar('PI-302', 'dao', 'Feed pump suction pressure', 10, 0.6, 0.05, 'PI-301'),
    thermo('TI-301', 'dao', 'Deaerator outlet temperature', 'Pt100 RTD', rtdA(0.2), 200),
    thermo('TI-302', 'mu', 'Process return and make-up temperature', 'bimetal thermometer', bimetal(1, 120, 1), 120),
    flow(
      'FI-301',
      'mu',
      'Process return and make-up flow',
      'electromagnetic flowmeter',
      { kind: 'percentReading', percent: 0.5, basis: 'u95' },
      60,
    ),
    level('LI-301', 'da', 'Deaerator storage tank level'),
    // condenser
    {
      tag: 'PI-401',
      label: 'Condenser vacuum',
      device: 'vacuum gauge',
      quantity: 'pressure',
      point: 'lpx',
      pressureReference: 'vacuum',
      range: { min: 0, max: 100e3 },
      accuracy: en837(1, 100e3, 0.5e3),
      unit: 'kPa',
      twin: 'PI-402',
    },
    {
      tag: 'PI-402',
      label: 'Condenser absolute pressure',
      device: 'absolute pressure gauge',
      quantity: 'pressure',
      point: 'lpx',
      pressureReference: 'absolute',
      range: { min: 0, max: 25e3 },
      accuracy: en837(0.6, 25e3, 0.1e3),
      unit: 'kPa',
      twin: 'PI-401',
    },
    thermo('TI-401', 'hw', 'Hotwell condensate temperature', 'Pt100 RTD', rtdA(0.1), 100),
    level('LI-401', 'cond', 'Hotwell level'),
    gaugeBar('PI-501', 'cpo', 'Condensate pump discharge pressure', 16, 1.6, 0.2),
    flow('FI-501', 'cpo', 'Condensate flow', 'orifice plate', { kind: 'orifice', beta: 0.6, otherPercent: 1.0 }, 100),
    thermo('TI-402', 'cwi', 'Cooling water inlet temperature', 'Pt100 RTD', rtdA(0.1), 60),
    thermo('TI-403A', 'cwo', 'Cooling water outlet temperature (RTD)', 'Pt100 RTD', rtdA(0.1), 60, 'TI-403B'),
    thermo(
      'TI-403B',
      'cwo',
      'Cooling water outlet temperature (glass thermometer)',
      'liquid-in-glass thermometer',
      { kind: 'absolute', value: 0.3, basis: 'tolerance', resolution: 0.2 },
      60,
      'TI-403A',
    ),
    flow(
      'FI-401',
      'cwi',
      'Cooling water flow',
      'clamp-on ultrasonic flowmeter',
      { kind: 'percentReading', percent: 2, basis: 'u95' },
      4000,
    ),
    // generator
    {
      tag: 'JI-601',
      label: 'Generator output (panel meter)',
      device: 'power transducer',
      quantity: 'power',
      equipment: 'gen',
      range: { min: 0, max: 30e6 },
      accuracy: { kind: 'percentReading', percent: 0.5, basis: 'tolerance', resolution: 0.01e6 },
      unit: 'MW',
      twin: 'JI-602',
    },
    {
      tag: 'JI-602',
      label: 'Generator output (export meter)',
      device: 'class 0.2 energy meter',
      quantity: 'power',
      equipment: 'gen',
      range: { min: 0, max: 30e6 },
      accuracy: { kind: 'percentReading', percent: 0.2, basis: 'tolerance', resolution: 0.001e6 },
      unit: 'MW',
      twin: 'JI-601',
    },
    level('LI-201', 'lph', 'LP heater shell level'),
  ];

  return {
    id: 'fernhallow-u1',
    name: 'Fernhallow Works — Unit 1 (Fernhallow Heat & Power)',
    points: [
      { id: 'fw', label: 'Feedwater to boiler', phase: 'liquid', nominal: nominal('fw') },
      { id: 'drum', label: 'Drum steam', phase: 'saturated-vapour', nominal: nominal('drum') },
      { id: 'ms', label: 'Main steam', phase: 'vapour', nominal: nominal('ms') },
      { id: 'hpx', label: 'HP exhaust', phase: 'vapour', nominal: nominal('hpx') },
      { id: 'proc', label: 'Process steam to site', phase: 'vapour', nominal: nominal('proc') },
      {
        id: 'das',
        label: 'Deaerator steam before reducing valve',
        phase: 'vapour',
        samePressureAs: 'hpx',
        nominal: nominal('das', false),
      },
      {
        id: 'das2',
        label: 'Deaerator steam after reducing valve',
        phase: 'vapour',
        samePressureAs: 'dao',
        nominal: nominal('das2', false),
      },
      { id: 'lpi', label: 'LP section inlet', phase: 'vapour', samePressureAs: 'hpx', nominal: nominal('lpi', false) },
      { id: 'lpe', label: 'LP extraction to LP heater', phase: 'vapour', nominal: nominal('lpe') },
      { id: 'lpx', label: 'LP exhaust to condenser', phase: 'two-phase', nominal: nominal('lpx') },
      {
        id: 'hw',
        label: 'Hotwell condensate',
        phase: 'saturated-liquid',
        samePressureAs: 'lpx',
        nominal: nominal('hw', false),
      },
      { id: 'cpo', label: 'Condensate pump discharge', phase: 'liquid', nominal: nominal('cpo') },
      {
        id: 'lhf',
        label: 'Condensate after LP heater',
        phase: 'liquid',
        samePressureAs: 'cpo',
        nominal: nominal('lhf', false),
      },
      {
        id: 'lhd',
        label: 'LP heater drain to condenser',
        phase: 'liquid',
        samePressureAs: 'lpe',
        nominal: nominal('lhd', false),
      },
      // no gauge on the return line: its pressure is the nominal 6 bar(a) (it barely moves the enthalpy of water)
      {
        id: 'mu',
        label: 'Process return and make-up water',
        phase: 'liquid',
        nominal: { p: d.makeupP, T: r4(d.makeupT), m: r4(P.mu.m) },
      },
      { id: 'dao', label: 'Deaerator outlet / feed pump suction', phase: 'saturated-liquid', nominal: nominal('dao') },
      {
        id: 'cwi',
        label: 'Cooling water inlet',
        phase: 'liquid',
        circuit: 'cooling',
        nominal: { p: d.coolingP, T: r4(d.coolingInT), m: r4(P.cwi.m) },
      },
      {
        id: 'cwo',
        label: 'Cooling water outlet',
        phase: 'liquid',
        circuit: 'cooling',
        nominal: { p: d.coolingP, T: r4(d.coolingOutT), m: r4(P.cwo.m) },
      },
    ],
    equipment: [
      {
        id: 'boiler',
        kind: 'boiler',
        label: 'Boiler (economiser and furnace walls)',
        criticality: 3,
        ports: { feedIn: 'fw', steamOut: 'drum' },
      },
      { id: 'drum', kind: 'drum', label: 'Steam drum', criticality: 3, ports: { steam: 'drum' } },
      { id: 'sh', kind: 'superheater', label: 'Superheater', criticality: 3, ports: { inlet: 'drum', outlet: 'ms' } },
      {
        id: 'hp',
        kind: 'turbine-section',
        label: 'HP turbine section',
        criticality: 3,
        ports: { inlet: 'ms', outlet: 'hpx' },
      },
      {
        id: 'hdr',
        kind: 'splitter',
        label: '13 bar header',
        criticality: 2,
        ports: { inlet: 'hpx', outlets: ['proc', 'das', 'lpi'] },
      },
      {
        id: 'prv',
        kind: 'throttle',
        label: 'Deaerator steam reducing valve',
        criticality: 1,
        ports: { inlet: 'das', outlet: 'das2' },
      },
      {
        id: 'lp',
        kind: 'turbine-section',
        label: 'LP turbine section',
        criticality: 3,
        ports: { inlet: 'lpi', outlet: 'lpx', extractions: ['lpe'] },
      },
      {
        id: 'cond',
        kind: 'condenser',
        label: 'Condenser',
        criticality: 3,
        ports: { steamIn: 'lpx', drainsIn: ['lhd'], condensateOut: 'hw', coolingIn: 'cwi', coolingOut: 'cwo' },
      },
      { id: 'cep', kind: 'pump', label: 'Condensate pump', criticality: 2, ports: { inlet: 'hw', outlet: 'cpo' } },
      {
        id: 'lph',
        kind: 'closed-heater',
        label: 'LP feedwater heater',
        criticality: 2,
        ports: { feedIn: 'cpo', feedOut: 'lhf', steamIn: 'lpe', drainOut: 'lhd' },
      },
      {
        id: 'da',
        kind: 'deaerator',
        label: 'Deaerator',
        criticality: 3,
        ports: { steamIn: 'das2', inlets: ['lhf', 'mu'], outlet: 'dao' },
      },
      { id: 'bfp', kind: 'pump', label: 'Boiler feed pump', criticality: 3, ports: { inlet: 'dao', outlet: 'fw' } },
      {
        id: 'gen',
        kind: 'generator',
        label: 'Generator',
        criticality: 3,
        sections: ['hp', 'lp'],
        efficiency: d.generatorEfficiency,
      },
    ],
    instruments: instruments as Instrument[],
  };
}

const DESIGN = designPoint();
const INPUT = demoModelInput(DESIGN);

/** The Fernhallow Works unit 1 cycle model, validated shape, with its content version. */
export const demoUnit: CycleModel = Object.freeze({ ...INPUT, version: modelVersion(INPUT) }) as CycleModel;

/** The design point the demo unit was built from. */
export function demoDesignPoint(): DesignPoint {
  return designPoint();
}

/** A reading with what the instrument's face shows (its unit and reference). */
export interface DemoReading extends RoundReading {
  instrumentTag: string;
  shown: { value: number; unit: Unit; reference?: PressureRef };
}

/**
 * The readings of every demo instrument at design, SI absolute (`valueSI`), with what each face
 * shows at the given barometric pressure (`shown`, in the instrument's unit and reference).
 */
export function demoDesignReadings(barometricPa: number): DemoReading[] {
  const dp = DESIGN;
  const out: DemoReading[] = [];
  for (const i of demoUnit.instruments) {
    let v: number;
    if (i.quantity === 'power') v = dp.power;
    else if (i.quantity === 'level') v = dp.levels[i.equipment!];
    else {
      const st = dp.points[i.point!];
      v = i.quantity === 'pressure' ? st.p : i.quantity === 'temperature' ? st.T : st.m;
    }
    const unit = i.unit as Unit;
    const shown = fromSI(i.quantity, v, unit, i.pressureReference, { barometricPa });
    out.push({
      instrumentTag: i.tag,
      valueSI: v,
      shown: { value: shown, unit, ...(i.pressureReference ? { reference: i.pressureReference } : {}) },
    });
  }
  return out;
}
