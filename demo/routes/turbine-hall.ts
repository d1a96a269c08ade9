/**
 * Fernhallow Works, "Turbine hall" round: HP stop valve, HP exhaust and 13 bar header, LP
 * extraction and LP heater, bearings, generator panel. Bands in each gauge's unit, around the demo
 * unit's design point. Invented demo data.
 */
import type { RouteTemplate } from '../../shared/route/template';

export const turbineHallRoute: RouteTemplate = {
  id: 'turbine-hall',
  name: 'Turbine hall',
  unitId: 'fernhallow-u1',
  stops: [
    {
      id: 'turbine-stop-valve',
      name: 'HP turbine stop valve',
      area: 'Turbine hall, operating floor, HP end',
      caution:
        'Hot surfaces: main-steam line lagging above 400 °C — do not touch, keep to the walkway. Steam at 63 bar(g): report a leak from a distance, never approach it.',
      readings: [
        { tag: 'PI-102', unit: 'bar', reference: 'gauge', band: { min: 56, max: 68 }, required: true },
        { tag: 'TI-102A', unit: '°C', band: { min: 470, max: 495 }, required: true },
        { tag: 'TI-102B', unit: '°C', band: { min: 470, max: 495 }, required: true },
      ],
      checks: [
        {
          id: 'tsv-steam-leak',
          prompt: 'Steam leaking at the stop valve gland or flanges?',
          kind: 'yes-no',
          expected: false,
          photoRequired: true,
        },
      ],
    },
    {
      id: 'hp-exhaust',
      name: 'HP exhaust and 13 bar header',
      area: 'Turbine hall, mezzanine, header station',
      caution:
        'Hot surfaces up to 300 °C on the header and the reducing-valve station; gloves on before touching any valve wheel.',
      readings: [
        { tag: 'PI-201', unit: 'bar', reference: 'gauge', band: { min: 10, max: 14 }, required: true },
        { tag: 'TI-201', unit: '°C', band: { min: 270, max: 310 }, required: true },
        { tag: 'PI-202', unit: 'bar', reference: 'gauge', band: { min: 10, max: 14 }, required: true },
        { tag: 'TI-202', unit: '°C', band: { min: 270, max: 310 }, required: true },
        { tag: 'FI-201', unit: 't/h', band: { min: 15, max: 45 }, required: true },
      ],
      checks: [
        {
          id: 'header-traps',
          prompt: 'Header steam traps',
          kind: 'choice',
          options: ['working', 'blowing steam', 'cold (blocked)'],
          photoRequired: false,
        },
      ],
    },
    {
      id: 'lp-heater',
      name: 'LP extraction and LP heater',
      area: 'Turbine hall, basement, heater bay',
      caution: 'Hot surfaces: the extraction line runs at about 155 °C.',
      readings: [
        { tag: 'PI-203', unit: 'bar', reference: 'gauge', band: { min: 1.5, max: 2.6 }, required: true },
        { tag: 'TI-204', unit: '°C', band: { min: 140, max: 170 }, required: true },
        { tag: 'TI-205', unit: '°C', band: { min: 38, max: 50 }, required: true },
        { tag: 'TI-206', unit: '°C', band: { min: 120, max: 138 }, required: true },
        { tag: 'TI-207', unit: '°C', band: { min: 42, max: 58 }, required: true },
        { tag: 'LI-201', unit: '%', band: { min: 15, max: 50 }, required: true },
      ],
      checks: [
        {
          id: 'lph-level-glass',
          prompt: 'LP heater level glass readable?',
          kind: 'yes-no',
          expected: true,
          photoRequired: false,
        },
      ],
    },
    {
      id: 'turbine-bearings',
      name: 'Turbine and generator bearings',
      area: 'Turbine hall, operating floor',
      caution: 'Rotating machinery: stay behind the barriers. Hearing protection on the operating floor.',
      readings: [],
      checks: [
        {
          id: 'bearing-oil-flow',
          prompt: 'Oil flowing in every bearing sight glass?',
          kind: 'yes-no',
          expected: true,
          photoRequired: false,
        },
        {
          id: 'turbine-vibration',
          prompt: 'Turbine noise and vibration',
          kind: 'choice',
          options: ['normal', 'higher than usual', 'unusual noise'],
          photoRequired: false,
        },
        {
          id: 'operating-floor-remarks',
          prompt: 'Anything else seen on the operating floor?',
          kind: 'text',
          photoRequired: false,
        },
      ],
    },
    {
      id: 'generator-panel',
      name: 'Generator panel',
      area: 'Turbine hall, electrical annexe',
      caution: 'Live switchgear: read the meters through the panel windows only; never open a panel door.',
      readings: [
        { tag: 'JI-601', unit: 'MW', band: { min: 15, max: 25 }, required: true },
        { tag: 'JI-602', unit: 'MW', band: { min: 15, max: 25 }, required: true },
      ],
      checks: [
        {
          id: 'gen-alarms',
          prompt: 'Any alarm lamp lit on the generator panel?',
          kind: 'yes-no',
          expected: false,
          photoRequired: true,
        },
      ],
    },
  ],
};
