/**
 * pullChanges: the reference data of a site changed since a cursor — units (with their cycle
 * model), instruments, routes with their current version's template. Each item is the whole row,
 * keyed by id, so applying one pull twice leaves the device as once.
 *
 * The cursor is a `sync_seq` value. Every write of a synced row takes a new one under one
 * transaction-scoped advisory lock (the `sync_stamp` trigger), so writers of synced rows commit in
 * sequence order; the three reads below share one REPEATABLE READ snapshot. Together: a pull that
 * sees version N has seen every version below N, and the next pull from N misses nothing.
 */
import type { DataSource } from 'typeorm';
import type { PullResponse, SyncInstrument, SyncRoute, SyncUnit } from '../../shared/api/sync';
import { InstrumentEntity, RouteEntity, PlantUnitEntity } from '../entities';

export async function pullChanges(ds: DataSource, siteId: string, cursor: number): Promise<PullResponse> {
  return ds.transaction('REPEATABLE READ', async (em) => {
    const units = await em
      .getRepository(PlantUnitEntity)
      .createQueryBuilder('u')
      .where('u.siteId = :siteId', { siteId })
      .andWhere('u.syncVersion > :cursor', { cursor })
      .orderBy('u.syncVersion', 'ASC')
      .getMany();
    const instruments = await em
      .getRepository(InstrumentEntity)
      .createQueryBuilder('i')
      .innerJoin('i.unit', 'u')
      .where('u.siteId = :siteId', { siteId })
      .andWhere('i.syncVersion > :cursor', { cursor })
      .orderBy('i.syncVersion', 'ASC')
      .getMany();
    const routes = await em
      .getRepository(RouteEntity)
      .createQueryBuilder('r')
      .innerJoinAndSelect('r.currentVersion', 'v')
      .where('r.siteId = :siteId', { siteId })
      .andWhere('GREATEST(r.syncVersion, v.syncVersion) > :cursor', { cursor })
      .orderBy('r.syncVersion', 'ASC')
      .getMany();

    let next = cursor;
    const bump = (v: number) => {
      if (v > next) next = v;
    };
    const outUnits: SyncUnit[] = units.map((u) => {
      bump(u.syncVersion);
      return {
        id: u.id,
        siteId: u.siteId,
        name: u.name,
        model: u.model,
        modelVersion: u.modelVersion,
        syncVersion: u.syncVersion,
      };
    });
    const outInstruments: SyncInstrument[] = instruments.map((i) => {
      bump(i.syncVersion);
      return {
        id: i.id,
        unitId: i.unitId,
        tag: i.tag,
        quantity: i.quantity,
        pointRef: i.pointRef,
        equipmentRef: i.equipmentRef,
        reference: i.reference,
        range: i.range,
        accuracy: i.accuracy,
        gaugeUnit: i.gaugeUnit,
        calibrationDate: i.calibrationDate,
        calibrationIntervalDays: i.calibrationIntervalDays,
        status: i.status,
        isBarometer: i.isBarometer,
        updatedAt: i.updatedAt.toISOString(),
        rowVersion: i.rowVersion,
        syncVersion: i.syncVersion,
      };
    });
    const outRoutes: SyncRoute[] = routes.map((r) => {
      const v = r.currentVersion!;
      const version = Math.max(r.syncVersion, v.syncVersion);
      bump(version);
      return {
        id: r.id,
        siteId: r.siteId,
        unitId: r.unitId,
        name: r.name,
        version: { id: v.id, number: v.number, publishedAt: v.publishedAt.toISOString(), template: v.template },
        syncVersion: version,
      };
    });
    return {
      cursor: next,
      units: outUnits,
      instruments: outInstruments,
      routes: outRoutes,
      serverTime: new Date().toISOString(),
    };
  });
}
