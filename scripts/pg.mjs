#!/usr/bin/env node
/**
 * A private PostgreSQL cluster for Trueround, on loopback, on a port of the project's own.
 *
 *   node scripts/pg.mjs start [--test]   provision (initdb once), start, create the database
 *   node scripts/pg.mjs stop  [--test]   stop the cluster
 *   node scripts/pg.mjs url   [--test]   print the connection URL
 *
 * The dev cluster lives in .data/pg on port 54329 and serves database `trueround`;
 * the test cluster lives in .data/pg-test on port 54330 (override with TR_PG_PORT, TR_PG_DIR).
 * Idempotent: running start twice leaves one cluster running.
 *
 * Debian's server binaries are found under /usr/lib/postgresql/<major>/bin. When none is
 * there and we run as root, `apt-get install -y postgresql` brings them; otherwise we stop
 * with a message saying what to install. initdb refuses to run as root, so as root the
 * cluster runs as the `postgres` user, which owns the data, log and socket folders.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, chownSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import net from 'node:net';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const ROLE = 'trueround';

export function clusterConfig({ test = false } = {}) {
  const port = Number(process.env.TR_PG_PORT || (test ? 54330 : 54329));
  let dir = process.env.TR_PG_DIR || join(ROOT, '.data', test ? 'pg-test' : 'pg');
  return { test, port, dir, database: test ? 'trueround_test' : 'trueround' };
}

export function databaseUrl(cfg, database = cfg.database) {
  return `postgres://${ROLE}@127.0.0.1:${cfg.port}/${database}`;
}

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

function log(msg) {
  process.stderr.write(`[pg] ${msg}\n`);
}

function findBinDir() {
  const base = '/usr/lib/postgresql';
  if (existsSync(base)) {
    const majors = readdirSync(base)
      .filter((d) => existsSync(join(base, d, 'bin', 'pg_ctl')))
      .sort((a, b) => Number(b) - Number(a));
    if (majors.length) return join(base, majors[0], 'bin');
  }
  return null;
}

function ensureBinaries() {
  let bin = findBinDir();
  if (bin) return bin;
  if (!isRoot()) {
    throw new Error(
      'PostgreSQL server binaries not found under /usr/lib/postgresql/*/bin. ' +
        "Install Debian's server package: sudo apt-get install -y postgresql",
    );
  }
  log("PostgreSQL server not found; installing Debian's postgresql package (apt-get)…");
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  spawnSync('apt-get', ['update'], { stdio: 'inherit', env });
  const r = spawnSync('apt-get', ['install', '-y', '--no-install-recommends', 'postgresql'], {
    stdio: 'inherit',
    env,
  });
  if (r.status !== 0) throw new Error('apt-get install -y postgresql failed');
  // Debian's package may create and start a system cluster; we do not use it.
  spawnSync('service', ['postgresql', 'stop'], { stdio: 'ignore' });
  bin = findBinDir();
  if (!bin) throw new Error('postgresql was installed but no pg_ctl was found');
  return bin;
}

/** Run a server binary, as the postgres user when we are root. */
function runPg(bin, tool, args, opts = {}) {
  const exe = join(bin, tool);
  const [cmd, argv] = isRoot() ? ['runuser', ['-u', 'postgres', '--', exe, ...args]] : [exe, args];
  return execFileSync(cmd, argv, { stdio: ['ignore', 'pipe', 'pipe'], ...opts }).toString();
}

function canPostgresUse(dir) {
  if (!isRoot()) return true;
  const r = spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', dirname(dir)]);
  return r.status === 0;
}

function prepareDir(cfg) {
  mkdirSync(cfg.dir, { recursive: true });
  if (!canPostgresUse(cfg.dir)) {
    // The checkout sits where the postgres user cannot reach: keep the cluster in /var/tmp.
    const h = createHash('sha1').update(cfg.dir).digest('hex').slice(0, 10);
    cfg.dir = join('/var/tmp', `trueround-pg-${h}`);
    mkdirSync(cfg.dir, { recursive: true });
    log(`checkout not reachable by the postgres user; cluster kept in ${cfg.dir}`);
  }
  if (isRoot()) {
    const uid = Number(execFileSync('id', ['-u', 'postgres']).toString().trim());
    const gid = Number(execFileSync('id', ['-g', 'postgres']).toString().trim());
    chownSync(cfg.dir, uid, gid);
  }
}

function portOpen(port) {
  return new Promise((res) => {
    const s = net.connect({ host: '127.0.0.1', port }, () => {
      s.end();
      res(true);
    });
    s.on('error', () => res(false));
  });
}

function isRunning(bin, cfg) {
  try {
    runPg(bin, 'pg_ctl', ['-D', join(cfg.dir, 'data'), 'status']);
    return true;
  } catch {
    return false;
  }
}

export async function startCluster(opts = {}) {
  const cfg = clusterConfig(opts);
  const bin = ensureBinaries();
  prepareDir(cfg);
  const data = join(cfg.dir, 'data');
  const sock = join(cfg.dir, 'sock');
  if (!existsSync(join(data, 'PG_VERSION'))) {
    log(`initdb into ${data}`);
    runPg(bin, 'initdb', ['-D', data, '-A', 'trust', '-U', ROLE, '-E', 'UTF8', '--no-instructions']);
  }
  if (!isRunning(bin, cfg)) {
    if (await portOpen(cfg.port)) {
      throw new Error(`port ${cfg.port} on 127.0.0.1 is taken by another server; set TR_PG_PORT to a free port`);
    }
    mkdirSync(sock, { recursive: true });
    if (isRoot()) {
      const uid = Number(execFileSync('id', ['-u', 'postgres']).toString().trim());
      const gid = Number(execFileSync('id', ['-g', 'postgres']).toString().trim());
      chownSync(sock, uid, gid);
    }
    log(`starting on 127.0.0.1:${cfg.port}`);
    const pgOpts = `-c listen_addresses=127.0.0.1 -p ${cfg.port} -k ${sock} -c fsync=${cfg.test ? 'off' : 'on'} -c max_connections=200`;
    runPg(bin, 'pg_ctl', ['-D', data, '-l', join(cfg.dir, 'server.log'), '-o', pgOpts, '-w', '-t', '60', 'start']);
  }
  // Create the database when missing.
  const psql = (sql, db = 'postgres') =>
    execFileSync(join(bin, 'psql'), ['-h', '127.0.0.1', '-p', String(cfg.port), '-U', ROLE, '-d', db, '-tAc', sql], {
      stdio: ['ignore', 'pipe', 'pipe'],
    })
      .toString()
      .trim();
  if (psql(`select 1 from pg_database where datname='${cfg.database}'`) !== '1') {
    psql(`create database ${cfg.database}`);
  }
  return { ...cfg, bin, url: databaseUrl(cfg), adminUrl: databaseUrl(cfg, 'postgres') };
}

export function stopCluster(opts = {}) {
  const cfg = clusterConfig(opts);
  const bin = findBinDir();
  if (!bin) return;
  for (const dir of [
    cfg.dir,
    join('/var/tmp', `trueround-pg-${createHash('sha1').update(cfg.dir).digest('hex').slice(0, 10)}`),
  ]) {
    const data = join(dir, 'data');
    if (existsSync(join(data, 'postmaster.pid'))) {
      log(`stopping ${data}`);
      try {
        runPg(bin, 'pg_ctl', ['-D', data, '-m', 'fast', '-w', 'stop']);
      } catch (e) {
        log(`stop failed: ${e.message}`);
      }
    }
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const [cmd = 'start'] = process.argv.slice(2).filter((a) => !a.startsWith('--'));
  const test = process.argv.includes('--test');
  try {
    if (cmd === 'start') {
      const c = await startCluster({ test });
      console.log(c.url);
    } else if (cmd === 'stop') {
      stopCluster({ test });
    } else if (cmd === 'url') {
      console.log(databaseUrl(clusterConfig({ test })));
    } else {
      throw new Error(`unknown command ${cmd}: use start, stop or url`);
    }
  } catch (e) {
    console.error(`[pg] ${e.message}${e.stderr ? '\n' + e.stderr.toString() : ''}`);
    process.exit(1);
  }
}
