/**
 * Routes and their published versions. A route's stops and checks change only by publishing a new
 * version (number + 1); the route then points at it and the next pull carries it. Rounds keep the
 * version they started with. Templates are validated against the unit's cycle model first.
 */
import type { EntityManager } from 'typeorm';
import { validateRoute, type RouteModel } from '../../checklists/validate';
import type { RouteTemplate } from '../../shared/route/template';
import {
  InstrumentEntity,
  RouteEntity,
  RouteVersionEntity,
  PlantUnitEntity,
  type Route,
  type RouteVersion,
} from '../entities';
import { AppError } from '../errors';

/**
 * The template checked against its unit: the model's id, and the unit's instruments as stored
 * (the model's instruments and site instruments outside the model such as the barometer).
 */
async function checkedTemplate(em: EntityManager, unitId: string, template: unknown): Promise<RouteTemplate> {
  const unit = await em.getRepository(PlantUnitEntity).findOneBy({ id: unitId });
  if (!unit) throw new AppError(404, 'not_found', `Unit ${unitId} not found`);
  const instruments = await em.getRepository(InstrumentEntity).findBy({ unitId });
  const model: RouteModel = {
    id: (unit.model as { id?: string } | null)?.id,
    instruments: instruments.map((i) => ({ tag: i.tag, quantity: i.quantity, pressureReference: i.reference })),
  };
  const r = validateRoute(template, model);
  if (!r.ok) {
    throw new AppError(
      400,
      'validation',
      `Invalid route template: ${r.issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
      r.issues.map((i) => ({ path: `template.${i.path}`, message: i.message })),
    );
  }
  return r.route;
}

export interface CreateRouteInput {
  siteId: string;
  unitId: string;
  template: unknown;
  publishedBy: string | null;
  publishedAt?: Date;
}

/** A new route with its template published as version 1. */
export async function createRoute(
  em: EntityManager,
  input: CreateRouteInput,
): Promise<{ route: Route; version: RouteVersion }> {
  const template = await checkedTemplate(em, input.unitId, input.template);
  const route = await em.getRepository(RouteEntity).save({
    siteId: input.siteId,
    unitId: input.unitId,
    key: template.id,
    name: template.name,
    currentVersionId: null,
  });
  const version = await em.getRepository(RouteVersionEntity).save({
    routeId: route.id,
    number: 1,
    template,
    publishedAt: input.publishedAt ?? new Date(),
    publishedBy: input.publishedBy,
  });
  await em.getRepository(RouteEntity).update({ id: route.id }, { currentVersionId: version.id });
  return { route: { ...route, currentVersionId: version.id }, version };
}

/** Publishes the next version of a route and makes it current. The template keeps the route's key. */
export async function publishRouteVersion(
  em: EntityManager,
  routeId: string,
  template: unknown,
  publishedBy: string | null,
): Promise<RouteVersion> {
  const route = await em
    .getRepository(RouteEntity)
    .findOne({ where: { id: routeId }, lock: { mode: 'pessimistic_write' } });
  if (!route) throw new AppError(404, 'not_found', `Route ${routeId} not found`);
  const checked = await checkedTemplate(em, route.unitId, template);
  if (checked.id !== route.key) {
    throw new AppError(
      400,
      'validation',
      `Invalid route template: id is "${checked.id}" but the route is "${route.key}"`,
      [{ path: 'template.id', message: `must be "${route.key}", the route's id` }],
    );
  }
  const last = (await em.query(`SELECT COALESCE(MAX("number"), 0) AS n FROM "route_versions" WHERE "route_id" = $1`, [
    routeId,
  ])) as {
    n: number;
  }[];
  const version = await em.getRepository(RouteVersionEntity).save({
    routeId,
    number: Number(last[0].n) + 1,
    template: checked,
    publishedAt: new Date(),
    publishedBy,
  });
  await em.getRepository(RouteEntity).update({ id: routeId }, { currentVersionId: version.id, name: checked.name });
  return version;
}
