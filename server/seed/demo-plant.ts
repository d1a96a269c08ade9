/**
 * The demo plant: Fernhallow Works' unit 1 (demo/unit.ts) with its instruments and
 * site barometer, and its three routes (demo/routes) published as version 1; Brackenmoor's
 * small Boiler 1 (./brackenmoor-unit.ts) with one route. Invented data throughout.
 *
 * Calibration dates lie 1–5 months before the seed, spread over the instruments, with intervals
 * by kind of instrument (common practice for site gauges: pressure gauges and flow meters yearly,
 * thermocouples and RTDs every two years, level glasses every six months).
 */
import type { EntityManager } from 'typeorm';
import { brackenmoorRoutes, fernhallowBarometer, fernhallowRoutes } from '../../demo/routes';
import type { RouteTemplate } from '../../shared/route/template';
import { demoUnit } from '../../demo/unit';
import type { CycleModel, Instrument as ModelInstrument } from '../../shared/cycle/model';
import { InstrumentEntity, MembershipEntity, SiteEntity, PlantUnitEntity, type Instrument } from '../entities';
import { createRoute } from '../sync/route-versions';
import { brackenmoorUnit } from '../../demo/brackenmoor-unit';
import { demoSites, type DemoSiteSlug } from './demo-users';

export interface DemoPlant {
  site: DemoSiteSlug;
  model: CycleModel;
  /** Site instruments that are not in the cycle model; the first barometer among them serves gauge readings. */
  extras: readonly { instrument: ModelInstrument; isBarometer: boolean }[];
  routes: readonly RouteTemplate[];
}

export const demoPlants: readonly DemoPlant[] = [
  {
    site: 'fernhallow',
    model: demoUnit,
    extras: [{ instrument: fernhallowBarometer, isBarometer: true }],
    routes: fernhallowRoutes,
  },
  { site: 'brackenmoor', model: brackenmoorUnit, extras: [], routes: brackenmoorRoutes },
];

const DAY_MS = 86_400_000;

function intervalDays(i: ModelInstrument): number {
  switch (i.quantity) {
    case 'temperature':
      return 730;
    case 'level':
      return 180;
    default:
      return 365;
  }
}

function isoDate(d: Date): string {
  return d.toISOString().slice(0, 10);
}

function instrumentRow(
  unitId: string,
  i: ModelInstrument,
  index: number,
  now: Date,
  isBarometer: boolean,
): Partial<Instrument> {
  // 30…150 days back, spread by position so the list is not all one date
  const daysBack = 30 + ((index * 37) % 121);
  return {
    unitId,
    tag: i.tag,
    quantity: i.quantity,
    pointRef: i.point ?? null,
    equipmentRef: i.equipment ?? null,
    reference: i.pressureReference ?? null,
    range: { min: i.range.min, max: i.range.max },
    accuracy: i.accuracy,
    gaugeUnit: i.unit,
    calibrationDate: isoDate(new Date(now.getTime() - daysBack * DAY_MS)),
    calibrationIntervalDays: intervalDays(i),
    status: 'ok',
    isBarometer,
  };
}

export interface PlantSeedResult {
  units: number;
  instruments: number;
  routes: number;
}

/**
 * Loads each demo plant whose site exists and has no unit yet (so a database seeded before the
 * plant existed gets it, and a second run does nothing). Run inside the seed's transaction.
 */
export async function seedDemoPlant(em: EntityManager, now = new Date()): Promise<PlantSeedResult> {
  const out: PlantSeedResult = { units: 0, instruments: 0, routes: 0 };
  for (const plant of demoPlants) {
    // the demo site by slug and name: a real site that happens to share a slug is left alone
    const demoName = demoSites.find((d) => d.slug === plant.site)!.name;
    const site = await em.getRepository(SiteEntity).findOneBy({ slug: plant.site, name: demoName });
    if (!site) continue;
    if ((await em.getRepository(PlantUnitEntity).countBy({ siteId: site.id })) > 0) continue;

    const unit = await em.getRepository(PlantUnitEntity).save({
      siteId: site.id,
      name: plant.model.name,
      model: plant.model,
      modelVersion: plant.model.version,
    });
    out.units++;
    const rows = [
      ...plant.model.instruments.map((i, k) => instrumentRow(unit.id, i, k, now, false)),
      ...plant.extras.map((x, k) =>
        instrumentRow(unit.id, x.instrument, plant.model.instruments.length + k, now, x.isBarometer),
      ),
    ];
    await em.getRepository(InstrumentEntity).save(rows);
    out.instruments += rows.length;

    const publisher = await em
      .getRepository(MembershipEntity)
      .createQueryBuilder('m')
      .where('m.siteId = :siteId', { siteId: site.id })
      .andWhere(`m.role IN ('admin', 'engineer')`)
      .orderBy('m.role', 'DESC')
      .getOne();
    for (const template of plant.routes) {
      await createRoute(em, {
        siteId: site.id,
        unitId: unit.id,
        template,
        publishedBy: publisher?.userId ?? null,
        publishedAt: now,
      });
      out.routes++;
    }
  }
  return out;
}
