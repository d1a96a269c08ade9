/**
 * Fernhallow Works, "Boiler house" round: barometer at the door, boiler feed pump, deaerator,
 * steam drum, superheater outlet. Bands are in each gauge's own unit and reference, around the
 * demo unit's design point (shared/cycle/demo-unit.ts), wide enough for normal load swings.
 * Invented demo data.
 */
import type { RouteTemplate } from '../../shared/route/template';

export const boilerHouseRoute: RouteTemplate = {
  id: 'boiler-house',
  name: 'Boiler house',
  unitId: 'fernhallow-u1',
  stops: [
    {
      id: 'boiler-house-entrance',
      name: 'Boiler house entrance',
      area: 'Boiler house, ground floor, east door',
      readings: [{ tag: 'PI-001', unit: 'mbar', reference: 'absolute', band: { min: 950, max: 1050 }, required: true }],
      checks: [
        {
          id: 'bh-ventilation',
          prompt: 'Boiler house ventilation louvres open and unobstructed?',
          kind: 'yes-no',
          expected: true,
          photoRequired: false,
        },
      ],
    },
    {
      id: 'feed-pump',
      name: 'Boiler feed pump',
      area: 'Boiler house, ground floor, feed pump bay',
      caution:
        'Rotating equipment: keep clear of the pump coupling and never reach past a guard. Discharge at about 75 bar(g) — do not open vents or drains.',
      readings: [
        { tag: 'PI-302', unit: 'bar', reference: 'gauge', band: { min: 2.5, max: 4.5 }, required: true },
        { tag: 'PI-103', unit: 'bar', reference: 'gauge', band: { min: 68, max: 82 }, required: true },
        { tag: 'TI-103', unit: '°C', band: { min: 140, max: 158 }, required: true },
        { tag: 'FI-102', unit: 't/h', band: { min: 60, max: 130 }, required: true },
      ],
      checks: [
        {
          id: 'bfp-seal-leak',
          prompt: 'Feed pump mechanical seal leaking?',
          kind: 'yes-no',
          expected: false,
          photoRequired: true,
        },
        {
          id: 'bfp-noise',
          prompt: 'Feed pump noise',
          kind: 'choice',
          options: ['normal', 'louder than usual', 'knocking or cavitating'],
          photoRequired: false,
        },
      ],
    },
    {
      id: 'deaerator',
      name: 'Deaerator',
      area: 'Boiler house, deaerator platform (+12 m)',
      caution:
        'Hot surfaces: deaerator shell and its steam line at 150–300 °C. The handrail is the platform edge — do not lean over it.',
      readings: [
        { tag: 'PI-301', unit: 'bar', reference: 'gauge', band: { min: 2.5, max: 4.5 }, required: true },
        { tag: 'TI-301', unit: '°C', band: { min: 138, max: 156 }, required: true },
        { tag: 'LI-301', unit: '%', band: { min: 40, max: 80 }, required: true },
        { tag: 'TI-203', unit: '°C', band: { min: 240, max: 310 }, required: false },
        { tag: 'FI-202', unit: 't/h', band: { min: 3, max: 12 }, required: false },
        { tag: 'TI-302', unit: '°C', band: { min: 55, max: 85 }, required: true },
        { tag: 'FI-301', unit: 't/h', band: { min: 20, max: 45 }, required: true },
      ],
      checks: [
        {
          id: 'da-vent-plume',
          prompt: 'Deaerator vent plume',
          kind: 'choice',
          options: ['small and steady', 'none', 'heavy'],
          photoRequired: false,
        },
      ],
    },
    {
      id: 'drum-platform',
      name: 'Steam drum',
      area: 'Boiler house, drum platform (+24 m)',
      caution:
        'Drum at about 67 bar(g) and 285 °C. Blow down the gauge glass only with face shield and gloves on, standing to the side of the glass.',
      readings: [
        { tag: 'PI-101', unit: 'bar', reference: 'gauge', band: { min: 60, max: 72 }, required: true },
        { tag: 'TI-101', unit: '°C', band: { min: 270, max: 295 }, required: true },
        { tag: 'LI-101', unit: '%', band: { min: 35, max: 65 }, required: true },
      ],
      checks: [
        {
          id: 'drum-glass-clear',
          prompt: 'Gauge glass clean and the level clearly visible?',
          kind: 'yes-no',
          expected: true,
          photoRequired: true,
        },
        {
          id: 'drum-sv-passing',
          prompt: 'Any drum safety valve simmering or passing?',
          kind: 'yes-no',
          expected: false,
          photoRequired: false,
        },
      ],
    },
    {
      id: 'superheater-outlet',
      name: 'Superheater outlet',
      area: 'Boiler house, main steam header (+24 m)',
      caution: 'Hot surfaces: main-steam line lagging above 400 °C — do not touch, keep to the walkway.',
      readings: [{ tag: 'FI-101', unit: 't/h', band: { min: 60, max: 130 }, required: true }],
      checks: [
        {
          id: 'ms-lagging',
          prompt: 'Main steam lagging intact (no damage, no hot spots, no wisps of steam)?',
          kind: 'yes-no',
          expected: true,
          photoRequired: true,
        },
      ],
    },
  ],
};
