/**
 * Device actions: record + outbox row in one local transaction, client-made ids, device time as
 * data, append-only readings, input checks that name the field.
 */
import { PushReading, PushRound } from '@/shared/api/sync';
import { ActionError } from '@/offline/actions';
import { UUID_PATTERN } from '@/offline/ids';
import { harness, INSTRUMENTS, RV1, sha256Hex } from './fixtures';

const outboxRows = (h: { db: { all<T>(sql: string): Promise<T[]> } }) =>
  h.db.all<{ seq: number; kind: string; record_id: string; payload: string; state: string }>(
    'SELECT * FROM outbox ORDER BY seq',
  );

describe('actions write their record and its outbox row together', () => {
  test('each action is one transaction: BEGIN … COMMIT around both inserts (SQLite: statements between BEGIN and COMMIT are atomic)', async () => {
    const h = await harness();
    h.db.log.length = 0;
    const round = await h.actions.startRound(RV1);
    const begins = h.db.log.filter((s) => s.startsWith('BEGIN')).length;
    const commits = h.db.log.filter((s) => s.startsWith('COMMIT')).length;
    expect([begins, commits]).toEqual([1, 1]);
    const inRound = h.db.log.slice(
      h.db.log.findIndex((s) => s.startsWith('BEGIN')),
      h.db.log.findIndex((s) => s.startsWith('COMMIT')) + 1,
    );
    expect(inRound.some((s) => s.startsWith('INSERT INTO rounds'))).toBe(true);
    expect(inRound.some((s) => s.startsWith('INSERT INTO outbox'))).toBe(true);
    const rows = await outboxRows(h);
    expect(rows.map((r) => [r.kind, r.record_id, r.state])).toEqual([['round', round.id, 'waiting']]);
  });

  test.each([
    ['startRound', /INSERT INTO outbox/, async (h: Awaited<ReturnType<typeof harness>>) => h.actions.startRound(RV1)],
    [
      'recordReading',
      /INSERT INTO outbox/,
      async (h: Awaited<ReturnType<typeof harness>>, roundId: string) =>
        h.actions.recordReading({
          roundId,
          instrumentTag: 'PI-101',
          valueTyped: 10.2,
          unit: 'bar',
          reference: 'gauge',
        }),
    ],
    [
      'answerCheck',
      /INSERT INTO outbox/,
      async (h: Awaited<ReturnType<typeof harness>>, roundId: string) =>
        h.actions.answerCheck({ roundId, checkId: 'gauge-glass-clear', answer: { kind: 'yes-no', value: true } }),
    ],
    [
      'attachPhoto',
      /INSERT INTO outbox/,
      async (h: Awaited<ReturnType<typeof harness>>, roundId: string) =>
        h.actions.attachPhoto({
          roundId,
          bytes: new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 1, 2, 3]),
          mime: 'image/jpeg',
        }),
    ],
    [
      'finishRound',
      /INSERT INTO outbox/,
      async (h: Awaited<ReturnType<typeof harness>>, roundId: string) => h.actions.finishRound(roundId),
    ],
    [
      'dismissSuspect',
      /INSERT INTO outbox/,
      async (h: Awaited<ReturnType<typeof harness>>, roundId: string) =>
        h.actions.dismissSuspect(roundId, 'PI-102', 'Re-read twice, needle free'),
    ],
  ])('%s: a failure writing the outbox row leaves neither the record nor the row', async (name, pattern, act) => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const tables = ['rounds', 'readings', 'check_answers', 'photos', 'dismissals', 'outbox'];
    const before = await Promise.all(tables.map((t) => h.db.all(`SELECT * FROM ${t}`)));
    h.db.failNext(pattern, 'disk I/O error (simulated)');
    await expect(act(h, round.id)).rejects.toThrow('disk I/O error (simulated)');
    const after = await Promise.all(tables.map((t) => h.db.all(`SELECT * FROM ${t}`)));
    expect(after).toEqual(before);
    // The store still works after the rollback.
    await expect(act(h, round.id)).resolves.toBeDefined();
    expect((await outboxRows(h)).length).toBe(2);
  });

  test('a failure writing the record (before the outbox row) also leaves nothing', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    h.db.failNext(/INSERT INTO readings/, 'constraint failed (simulated)');
    await expect(
      h.actions.recordReading({ roundId: round.id, instrumentTag: 'TI-101', valueTyped: 184, unit: '°C' }),
    ).rejects.toThrow('simulated');
    expect(await h.db.all('SELECT * FROM readings')).toEqual([]);
    expect((await outboxRows(h)).map((r) => r.kind)).toEqual(['round']);
  });
});

describe('ids and device time', () => {
  test('ids are UUID version 4 (RFC 9562 §5.4: version nibble 4, variant 10xx) made on the device', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const reading = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
    });
    for (const id of [round.id, reading.id]) {
      expect(id).toMatch(UUID_PATTERN);
      expect(id[14]).toBe('4');
      expect('89ab').toContain(id[19]);
    }
    expect(round.id).not.toBe(reading.id);
  });

  test('an action repeated with the same id writes nothing the second time (idempotent ids)', async () => {
    const h = await harness();
    const id = '919108f7-52d1-4320-9bac-f847db4148a8'; // RFC 9562 Appendix A.3, the example UUIDv4 (from memory)
    const a = await h.actions.startRound(RV1, { id });
    const b = await h.actions.startRound(RV1, { id });
    expect(b).toEqual(a);
    const rid = '9f1c2a4e-0d7b-4c1e-a1f3-2b6c8d9e0f10';
    const input = {
      id: rid,
      roundId: id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge' as const,
    };
    const r1 = await h.actions.recordReading(input);
    h.clock.advance(5_000);
    const r2 = await h.actions.recordReading(input);
    expect(r2).toEqual(r1);
    expect((await outboxRows(h)).map((r) => [r.kind, r.record_id])).toEqual([
      ['round', id],
      ['reading', rid],
    ]);
  });

  test('an id given twice for different things is refused, naming the id', async () => {
    const h = await harness();
    const a = await h.actions.startRound(RV1);
    const b = await h.actions.startRound(RV1);
    const id = '9f1c2a4e-0d7b-4c1e-a1f3-2b6c8d9e0f11';
    await h.actions.recordReading({
      id,
      roundId: a.id,
      instrumentTag: 'PI-101',
      valueTyped: 10,
      unit: 'bar',
      reference: 'gauge',
    });
    await expect(
      h.actions.recordReading({
        id,
        roundId: b.id,
        instrumentTag: 'PI-101',
        valueTyped: 10,
        unit: 'bar',
        reference: 'gauge',
      }),
    ).rejects.toThrow(/^id: already used by a reading of round/);
  });

  test('device time is recorded as data, in ISO 8601 UTC, from the injected clock', async () => {
    const h = await harness();
    h.clock.t = Date.UTC(2025, 10, 30, 7, 42, 10, 5);
    const round = await h.actions.startRound(RV1);
    h.clock.advance(60_000);
    const reading = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'TI-101',
      valueTyped: 184.5,
      unit: '°C',
    });
    expect(round.startedAt).toBe('2025-11-30T07:42:10.005Z');
    expect(reading.deviceTime).toBe('2025-11-30T07:43:10.005Z');
    const payload = JSON.parse((await outboxRows(h))[1].payload);
    expect(PushReading.parse(payload).deviceTime).toBe('2025-11-30T07:43:10.005Z');
  });
});

describe('readings', () => {
  test('the outbox payload is the wire reading, with the instrument id looked up from the tag', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
      note: 'needle steady',
      confirmedAfterFlag: true,
      flags: [{ code: 'out-of-range', message: 'Above the usual 9–11 bar(g)' }],
    });
    const row = (await outboxRows(h))[1];
    expect(PushReading.parse(JSON.parse(row.payload))).toEqual({
      id: row.record_id,
      roundId: round.id,
      instrumentId: INSTRUMENTS['PI-101'],
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
      deviceTime: '2025-11-30T07:00:00.000Z',
      note: 'needle steady',
      skipReason: null,
      supersedes: null,
      confirmedAfterFlag: true,
      flags: [{ code: 'out-of-range', message: 'Above the usual 9–11 bar(g)' }],
    });
  });

  test('append-only: a correction is a new row that supersedes the old; UPDATE and DELETE are refused by the store', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const first = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 1.02,
      unit: 'bar',
      reference: 'gauge',
    });
    const fix = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-101',
      valueTyped: 10.2,
      unit: 'bar',
      reference: 'gauge',
      supersedes: first.id,
    });
    expect((await h.store.roundReadings(round.id)).map((r) => r.id)).toEqual([fix.id]);
    const all = await h.store.roundReadings(round.id, { all: true });
    expect(all.map((r) => [r.valueTyped, r.supersedes, r.supersededBy])).toEqual([
      [1.02, null, fix.id],
      [10.2, first.id, null],
    ]);
    await expect(h.db.run('UPDATE readings SET value_typed = 0 WHERE id = ?', [first.id])).rejects.toThrow(
      /append-only/,
    );
    await expect(h.db.run('DELETE FROM readings WHERE id = ?', [first.id])).rejects.toThrow(/append-only/);
    await expect(
      h.actions.recordReading({
        roundId: round.id,
        instrumentTag: 'PI-101',
        valueTyped: 10.3,
        unit: 'bar',
        reference: 'gauge',
        supersedes: first.id,
      }),
    ).rejects.toThrow(`supersedes: already superseded by ${fix.id}`);
    await expect(
      h.actions.recordReading({
        roundId: round.id,
        instrumentTag: 'TI-101',
        valueTyped: 184,
        unit: '°C',
        supersedes: fix.id,
      }),
    ).rejects.toThrow('supersedes: that reading is of PI-101, not TI-101');
  });

  test('bad input names the field, its value and the rule', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const base = { roundId: round.id, instrumentTag: 'PI-101', unit: 'bar', reference: 'gauge' as const };
    await expect(h.actions.recordReading({ ...base, valueTyped: null })).rejects.toThrow(
      'skipReason: A reading without a value needs a skip reason',
    );
    await expect(h.actions.recordReading({ ...base, valueTyped: 2e12 })).rejects.toThrow(
      'valueTyped: Must be at most 1000000000000 (got 2000000000000)',
    );
    await expect(h.actions.recordReading({ ...base, instrumentTag: 'FI-999', valueTyped: 1 })).rejects.toThrow(
      /^instrumentTag: no instrument with this tag .* \(got "FI-999"\)$/,
    );
    await expect(h.actions.recordReading({ ...base, roundId: 'nope', valueTyped: 1 })).rejects.toThrow(
      'roundId: no such round on this device (got "nope")',
    );
    const skipped = await h.actions.recordReading({
      ...base,
      valueTyped: null,
      skipReason: 'Gauge behind scaffolding',
    });
    expect(skipped.valueTyped).toBeNull();
    const err = await h.actions.startRound('not-a-version').catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ActionError);
    expect((err as ActionError).field).toBe('routeVersionId');
  });

  test('a finished round takes no more readings', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    await h.actions.finishRound(round.id);
    await expect(
      h.actions.recordReading({ roundId: round.id, instrumentTag: 'TI-101', valueTyped: 184, unit: '°C' }),
    ).rejects.toThrow(/round is finished/);
  });
});

describe('rounds, answers, photos, dismissals', () => {
  test('finish and dismissals re-send the whole round; finishing twice adds nothing', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const r = await h.actions.recordReading({
      roundId: round.id,
      instrumentTag: 'PI-102',
      valueTyped: 10.9,
      unit: 'bar',
      reference: 'gauge',
    });
    h.clock.advance(1000);
    await h.actions.dismissSuspect(round.id, 'PI-102', 'Checked against PI-101, both agree');
    h.clock.advance(1000);
    const fin = await h.actions.finishRound(round.id);
    await h.actions.finishRound(round.id);
    expect(fin.status).toBe('finished');
    const rows = (await outboxRows(h))
      .filter((x) => x.kind === 'round')
      .map((x) => PushRound.parse(JSON.parse(x.payload)));
    expect(rows.map((x) => [x.status, x.dismissals.length, x.finishedAt ?? null])).toEqual([
      ['in-progress', 0, null],
      ['in-progress', 1, null],
      ['finished', 1, '2025-11-30T07:00:02.000Z'],
    ]);
    expect(rows[2].dismissals[0]).toEqual({
      readingId: r.id,
      tag: 'PI-102',
      flag: 'suspect',
      note: 'Checked against PI-101, both agree',
      deviceTime: '2025-11-30T07:00:01.000Z',
    });
    await expect(h.actions.dismissSuspect(round.id, 'PI-102', ' ')).rejects.toThrow(/round is finished/);
  });

  test('answers are checked against the route version template', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    await expect(
      h.actions.answerCheck({ roundId: round.id, checkId: 'no-such', answer: { kind: 'yes-no', value: true } }),
    ).rejects.toThrow('checkId: no such check on route version 1 (got "no-such")');
    await expect(
      h.actions.answerCheck({
        roundId: round.id,
        checkId: 'gauge-glass-clear',
        answer: { kind: 'text', value: 'fine' },
      }),
    ).rejects.toThrow('answer.kind: check "gauge-glass-clear" takes a yes-no answer (got "text")');
    await expect(
      h.actions.answerCheck({ roundId: round.id, checkId: 'trap-state', answer: { kind: 'choice', value: 'leaking' } }),
    ).rejects.toThrow('answer.value: must be one of "working", "blowing", "cold" (got "leaking")');
    await h.actions.answerCheck({
      roundId: round.id,
      checkId: 'trap-state',
      answer: { kind: 'choice', value: 'blowing' },
    });
    await h.actions.answerCheck({
      roundId: round.id,
      checkId: 'trap-state',
      answer: { kind: 'choice', value: 'working' },
      note: 'second look',
    });
    const answers = await h.store.roundCheckAnswers(round.id);
    expect(answers.map((a) => [a.checkId, a.answer])).toEqual([['trap-state', { kind: 'choice', value: 'working' }]]);
  });

  test('a photo keeps its bytes, mime and SHA-256 (FIPS 180-4 example: SHA-256("abc") = ba7816bf…15ad)', async () => {
    const h = await harness();
    const round = await h.actions.startRound(RV1);
    const abc = new TextEncoder().encode('abc');
    const photo = await h.actions.attachPhoto({ roundId: round.id, bytes: abc, mime: 'image/png' });
    expect(photo.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(photo.uploadState).toBe('local');
    expect(Array.from((await h.store.photoData(photo.id))!)).toEqual([0x61, 0x62, 0x63]);
    await expect(h.actions.attachPhoto({ roundId: round.id, bytes: abc, mime: 'image/gif' })).rejects.toThrow(
      'mime: must be one of image/jpeg, image/png, image/webp, image/heic, image/heif (got "image/gif")',
    );
    await expect(
      h.actions.attachPhoto({ roundId: round.id, bytes: new Uint8Array(0), mime: 'image/png' }),
    ).rejects.toThrow('bytes: the photo is empty (got 0 bytes)');
  });

  test('the default SHA-256 (Web Crypto) agrees with OpenSSL through node:crypto', async () => {
    const { createActions } = await import('@/offline/actions');
    const h = await harness();
    const actions = createActions({ store: h.store, ids: h.ids, clock: h.clock });
    const round = await actions.startRound(RV1);
    const bytes = Uint8Array.from({ length: 5000 }, (_, i) => (i * 31) % 251);
    const p = await actions.attachPhoto({ roundId: round.id, bytes, mime: 'image/jpeg' });
    expect(p.sha256).toBe(sha256Hex(bytes));
  });
});
