/** start()/stop(): the real server on a loopback port (PORT=0 asks the OS for a free one). */
import { start, stop } from '../../server/main';
import { testConfig } from './helpers/app';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
beforeAll(async () => {
  db = await createTestDatabase();
});
afterAll(async () => {
  await stop();
  await db?.drop();
});

test('start() listens on a free port and answers health; stop() closes the port and the pool', async () => {
  const running = await start(testConfig(db.url, { HOST: '127.0.0.1', PORT: '0' }));
  expect(running.port).toBeGreaterThan(0);
  expect(running.url).toBe(`http://127.0.0.1:${running.port}`);
  const res = await fetch(`${running.url}/api/health`);
  expect(res.status).toBe(200);
  expect(await res.json()).toEqual({ status: 'ok', db: 'ok' });

  await running.stop();
  expect(running.server.listening).toBe(false);
  expect(running.dataSource.isInitialized).toBe(false);
  await expect(fetch(`${running.url}/api/health`)).rejects.toThrow();
  await running.stop(); // idempotent
});

test('a database that cannot be reached stops start() with the driver error, leaving nothing open', async () => {
  await expect(start(testConfig('postgres://trueround@127.0.0.1:1/none'))).rejects.toThrow(/ECONNREFUSED|connect/);
});
