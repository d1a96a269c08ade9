/**
 * Brackenmoor Boiler House (invented demo site): the one short round of Boiler 1
 * (server/seed/brackenmoor-unit.ts).
 */
import type { RouteTemplate } from '../../shared/route/template';

export const brackenmoorBoilerRoute: RouteTemplate = {
  id: 'brackenmoor-boiler-house',
  name: 'Boiler 1 round',
  unitId: 'brackenmoor-b1',
  stops: [
    {
      id: 'boiler-front',
      name: 'Boiler 1 front',
      area: 'Boiler house, firing floor',
      caution:
        'Hot surfaces around the burner and the front smoke box; flame viewing only through the sight glass, with tinted glasses.',
      readings: [
        { tag: 'PI-101', unit: 'bar', reference: 'gauge', band: { min: 8, max: 11 }, required: true },
        { tag: 'LI-101', unit: '%', band: { min: 35, max: 65 }, required: true },
        { tag: 'FI-101', unit: 't/h', band: { min: 3, max: 12 }, required: true },
      ],
      checks: [
        {
          id: 'burner-flame',
          prompt: 'Burner flame',
          kind: 'choice',
          options: ['steady', 'unstable', 'smoky'],
          photoRequired: false,
        },
      ],
    },
    {
      id: 'feed-tank',
      name: 'Feed tank and feed pumps',
      area: 'Boiler house, feed tank platform',
      readings: [{ tag: 'TI-101', unit: '°C', band: { min: 85, max: 115 }, required: true }],
      checks: [
        {
          id: 'feed-pump-leak',
          prompt: 'Feed pump gland leaking?',
          kind: 'yes-no',
          expected: false,
          photoRequired: true,
        },
      ],
    },
  ],
};
