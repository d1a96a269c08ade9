/**
 * Fernhallow Works, "Condenser and cooling water" round: condenser, condensate pump, cooling-water
 * inlet at the pump house, outlet box. Bands in each gauge's unit, around the demo unit's design
 * point. Invented demo data.
 */
import type { RouteTemplate } from '../../shared/route/template';

export const condenserCoolingWaterRoute: RouteTemplate = {
  id: 'condenser-cooling-water',
  name: 'Condenser and cooling water',
  unitId: 'fernhallow-u1',
  stops: [
    {
      id: 'condenser',
      name: 'Condenser',
      area: 'Turbine hall, basement, condenser pit edge',
      caution:
        'Confined space: do not enter the condenser pit without a permit. Wet, slippery floor around the hotwell.',
      readings: [
        { tag: 'PI-401', unit: 'kPa', reference: 'vacuum', band: { min: 85, max: 95 }, required: true },
        { tag: 'PI-402', unit: 'kPa', reference: 'absolute', band: { min: 5, max: 14 }, required: true },
        { tag: 'TI-401', unit: '°C', band: { min: 33, max: 52 }, required: true },
        { tag: 'LI-401', unit: '%', band: { min: 30, max: 60 }, required: true },
      ],
      checks: [
        {
          id: 'air-extraction',
          prompt: 'Air extraction ejector running normally (steady, no hunting)?',
          kind: 'yes-no',
          expected: true,
          photoRequired: false,
        },
      ],
    },
    {
      id: 'condensate-pump',
      name: 'Condensate pump',
      area: 'Turbine hall, basement, pump bay',
      caution: 'Rotating equipment: keep clear of the pump coupling and never reach past a guard.',
      readings: [
        { tag: 'PI-501', unit: 'bar', reference: 'gauge', band: { min: 7, max: 11 }, required: true },
        { tag: 'FI-501', unit: 't/h', band: { min: 40, max: 90 }, required: true },
      ],
      checks: [
        {
          id: 'cep-seal-leak',
          prompt: 'Condensate pump seal leaking?',
          kind: 'yes-no',
          expected: false,
          photoRequired: true,
        },
      ],
    },
    {
      id: 'cw-inlet',
      name: 'Cooling water inlet',
      area: 'Cooling water pump house, intake',
      caution: 'Open water: wear the life jacket beyond the handrail at the intake screens; never work there alone.',
      readings: [
        { tag: 'TI-402', unit: '°C', band: { min: 4, max: 32 }, required: true },
        { tag: 'FI-401', unit: 't/h', band: { min: 2500, max: 4000 }, required: true },
      ],
      checks: [
        {
          id: 'cw-screens',
          prompt: 'Intake screens',
          kind: 'choice',
          options: ['clear', 'partly fouled', 'blocked'],
          photoRequired: true,
        },
      ],
    },
    {
      id: 'cw-outlet',
      name: 'Cooling water outlet',
      area: 'Turbine hall, basement, condenser outlet box',
      readings: [
        { tag: 'TI-403A', unit: '°C', band: { min: 12, max: 42 }, required: true },
        { tag: 'TI-403B', unit: '°C', band: { min: 12, max: 42 }, required: true },
      ],
      checks: [
        {
          id: 'cw-outlet-leak',
          prompt: 'Water leaking at the outlet box or its expansion joint?',
          kind: 'yes-no',
          expected: false,
          photoRequired: false,
        },
      ],
    },
  ],
};
