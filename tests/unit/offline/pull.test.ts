/**
 * Pull of reference data with the server's cursor, and the zod check of stored JSON on read.
 */
import { client, dump, FakeServer, harness, instrument, pull, route, RV1, RV2, SITE, UNIT, unit } from './fixtures';

const REFERENCE = ['units', 'instruments', 'routes', 'route_versions', 'pull_cursors'];

describe('pull', () => {
  test('applying the same pull twice gives the same state (rows replaced whole, keyed by id)', async () => {
    const h = await harness({ seed: false });
    const p = pull(7);
    await h.store.applyPull(SITE, p);
    const once = await dump(h.db, REFERENCE);
    await h.store.applyPull(SITE, p);
    expect(await dump(h.db, REFERENCE)).toEqual(once);
    expect(once.instruments.length).toBe(4);
    expect(await h.store.pullCursor(SITE)).toBe(7);
  });

  test('the client sends the stored cursor and keeps the one the server returns', async () => {
    const h = await harness({ seed: false });
    const server = new FakeServer();
    const c = client(h, server);
    await c.syncNow();
    expect(server.pulls).toEqual([{ cursor: 0, siteId: SITE }]);
    expect(await h.store.pullCursor(SITE)).toBe(3);
    expect((await h.store.listRoutes(SITE)).map((r) => r.name)).toEqual(['Boiler house morning round']);
    // A newer route version and an instrument turned suspect arrive with a higher sync version.
    server.pullData = pull(5, {
      routes: [route(RV2, 2, 5)],
      instruments: [instrument('PI-102', 4, 'suspect')],
      units: [],
    });
    await c.syncNow({ force: true });
    expect(server.pulls[1]).toEqual({ cursor: 3, siteId: SITE });
    expect((await h.store.getRoute((await h.store.listRoutes(SITE))[0].id))!.version.id).toBe(RV2);
    expect((await h.store.listInstruments(UNIT)).find((i) => i.tag === 'PI-102')!.status).toBe('suspect');
    // Every version seen is kept: a round started on version 1 still finds its template.
    expect((await h.store.getRouteVersion(RV1))!.number).toBe(1);
    expect((await h.store.getRouteVersion(RV2))!.number).toBe(2);
    const s = await c.status();
    expect(s.lastSyncAt).toBe(new Date(h.clock.t).toISOString());
    expect(s.lastServerTime).toBe('2025-11-30T07:00:00.000Z');
  });

  test('an older pull applied late does not undo a newer one, and the cursor never goes back', async () => {
    const h = await harness({ seed: false });
    await h.store.applyPull(SITE, pull(9, { units: [unit(9, 'Unit 1 (renamed)')] }));
    await h.store.applyPull(SITE, pull(3));
    expect((await h.store.getUnit(UNIT))!.name).toBe('Unit 1 (renamed)');
    expect(await h.store.pullCursor(SITE)).toBe(9);
  });

  test('a pull that does not match the wire schema is not applied and is retried', async () => {
    const h = await harness({ seed: false });
    const server = new FakeServer();
    server.pull = async () => ({ cursor: 'soon', units: [] });
    const c = client(h, server);
    const r = await c.syncNow();
    expect(r.problem?.kind).toBe('bad-response');
    expect(r.problem?.message).toMatch(/^The server's routes and instruments did not make sense \(cursor: /);
    expect(c.nextAttemptAt()).not.toBeNull();
    expect(await dump(h.db, ['units', 'pull_cursors'])).toEqual({ units: [], pull_cursors: [] });
  });
});

describe('stored JSON is zod-checked on read', () => {
  test('a damaged reference row is reported and left out; the others are read', async () => {
    const h = await harness();
    const damaged = instrument('TI-101');
    await h.db.run('UPDATE instruments SET json = ? WHERE id = ?', [
      JSON.stringify({ ...damaged, quantity: 'colour' }),
      damaged.id,
    ]);
    await h.db.run('UPDATE instruments SET json = ? WHERE tag = ?', ['{not json', 'PI-BARO']);
    const list = await h.store.listInstruments(UNIT);
    expect(list.map((i) => i.tag)).toEqual(['PI-101', 'PI-102']);
    const bad = h.store.badRows();
    // Reported in reading order (by tag): PI-BARO, then TI-101.
    expect(bad.map((b) => [b.table, b.id, b.column])).toEqual([
      ['instruments', instrument('PI-BARO').id, 'json'],
      ['instruments', damaged.id, 'json'],
    ]);
    expect(bad[0].problem).toMatch(/^not JSON/);
    expect(bad[1].problem).toMatch(/^quantity: /);
  });

  test('a damaged outbox row is set aside as refused with the reason; the rest of the queue is pushed', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const a = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
    });
    const b = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'TI-101',
      valueTyped: 184,
      unit: '°C',
    });
    await h.db.run(`UPDATE outbox SET payload = ? WHERE record_id = ?`, [
      JSON.stringify({ id: a.id, valueTyped: 'ten' }),
      a.id,
    ]);
    const server = new FakeServer();
    const c = client(h, server);
    const r = await c.syncNow();
    expect(r.ok).toBe(true);
    expect(server.readings.has(b.id)).toBe(true);
    expect(server.readings.has(a.id)).toBe(false);
    const s = await c.status();
    expect(
      s.refusedItems.map((x) => [
        x.recordId,
        x.message.startsWith('This record is damaged on the device and cannot be sent ('),
      ]),
    ).toEqual([[a.id, true]]);
    expect(s.badRows.some((x) => x.table === 'outbox' && x.column === 'payload')).toBe(true);
  });

  test('damaged flags on a reading are reported; the reading is still shown', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const a = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
    });
    // Bypass the append-only trigger the way a broken writer might (drop, write, restore).
    await h.db.exec('DROP TRIGGER readings_no_update');
    await h.db.run(`UPDATE readings SET flags_json = '[{"code":"Bad Code"}]' WHERE id = ?`, [a.id]);
    const [r] = await h.store.roundReadings(round.id);
    expect(r.id).toBe(a.id);
    expect(r.flags).toEqual([]);
    expect(h.store.badRows()).toEqual([expect.objectContaining({ table: 'readings', id: a.id, column: 'flags_json' })]);
  });
});
