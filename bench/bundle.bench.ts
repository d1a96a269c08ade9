/**
 * Web bundle size: exports the web build with source maps (expo export --platform web
 * --source-maps, the same settings as scripts/build-web.mjs, into .tmp/bundle-bench) and prints
 * the entry chunk's size raw and gzipped (zlib level 6, what a web server sends by default),
 * beside the issue's targets (1.2 MB raw, 350 KB gzip) as ratios, every other chunk, and the
 * modules and packages that take the most of the entry (bytes of minified output attributed
 * through the source map).
 *
 * BUNDLE_BENCH_DIR=<an export made with --source-maps> measures that export instead of making one.
 */
import { execSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { gzipSync } from 'node:zlib';

const ROOT = resolve(__dirname, '..');
const TARGET_RAW = 1.2e6;
const TARGET_GZIP = 350e3;

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const B64_VALUE = new Map([...B64].map((c, i) => [c, i]));

/** Decodes one source-map segment (base64 VLQ) into its fields. */
function decodeSegment(seg: string): number[] {
  const out: number[] = [];
  let value = 0;
  let shift = 0;
  for (const c of seg) {
    const d = B64_VALUE.get(c);
    if (d === undefined) throw new Error(`bundle bench: bad source-map character ${c}`);
    value += (d & 31) << shift;
    if (d & 32) {
      shift += 5;
      continue;
    }
    out.push(value & 1 ? -(value >>> 1) : value >>> 1);
    value = 0;
    shift = 0;
  }
  return out;
}

/**
 * Bytes of the generated file per source file: each mapped segment owns the text up to the next
 * segment of its line. Text before a line's first segment, or of a segment without a source,
 * counts as '(unmapped)'.
 */
export function bytesBySource(code: string, map: { sources: string[]; mappings: string }): Map<string, number> {
  const lines = code.split('\n');
  const by = new Map<string, number>();
  const add = (k: string, n: number) => by.set(k, (by.get(k) ?? 0) + n);
  let src = 0;
  map.mappings.split(';').forEach((line, li) => {
    const text = lines[li] ?? '';
    let col = 0;
    const segs: { col: number; src: number | null }[] = [];
    for (const s of line.split(',')) {
      if (!s) continue;
      const f = decodeSegment(s);
      col += f[0];
      if (f.length >= 4) {
        src += f[1];
        segs.push({ col, src });
      } else segs.push({ col, src: null });
    }
    if (segs.length === 0) {
      add('(unmapped)', Buffer.byteLength(text) + 1);
      return;
    }
    add('(unmapped)', Buffer.byteLength(text.slice(0, segs[0].col)));
    segs.forEach((s, k) => {
      const end = k + 1 < segs.length ? segs[k + 1].col : text.length + 1; // the newline goes with the last segment
      const n = Buffer.byteLength(text.slice(s.col, end));
      add(s.src === null ? '(unmapped)' : map.sources[s.src], n);
    });
  });
  return by;
}

/** node_modules/<package> (scoped: @scope/name), else the project's first two folders. */
export function groupOf(source: string): string {
  const s = source
    .replace(/\\/g, '/')
    .replace(/^.*?\/(?=node_modules\/)/, '')
    .replace(/^(\.\.\/)+/, '');
  const nm = s.lastIndexOf('node_modules/');
  if (nm >= 0) {
    const parts = s.slice(nm + 'node_modules/'.length).split('/');
    return `node_modules/${parts[0].startsWith('@') ? `${parts[0]}/${parts[1]}` : parts[0]}`;
  }
  const rel = (s.startsWith(`${ROOT}/`) ? s.slice(ROOT.length + 1) : s).replace(/^\//, '');
  const parts = rel.split('/');
  return parts.length > 2 ? `${parts[0]}/${parts[1]}/` : rel;
}

function exportWithMaps(dir: string): number {
  rmSync(dir, { recursive: true, force: true });
  const t0 = Date.now();
  execSync(`npx expo export --platform web --source-maps --output-dir ${JSON.stringify(dir)}`, {
    cwd: ROOT,
    stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, EXPO_OFFLINE: '1', EXPO_NO_TELEMETRY: '1', EXPO_UNSTABLE_HEADLESS: '1', CI: '1' },
  });
  return (Date.now() - t0) / 1000;
}

const kb = (n: number) => Number((n / 1e3).toFixed(1));

export async function run(): Promise<void> {
  let dir = process.env.BUNDLE_BENCH_DIR;
  if (dir) console.log(`measuring the export in ${dir}`);
  else {
    dir = join(ROOT, '.tmp', 'bundle-bench');
    const s = exportWithMaps(dir);
    console.log(`exported with source maps into ${dir} in ${s.toFixed(0)} s`);
  }
  const js = join(dir, '_expo', 'static', 'js', 'web');
  if (!existsSync(js)) throw new Error(`bundle bench: no ${js}`);
  const chunks = readdirSync(js).filter((f) => f.endsWith('.js'));
  const entry = chunks.find((f) => f.startsWith('entry-'));
  if (!entry) throw new Error(`bundle bench: no entry-*.js in ${js}`);

  const rows = chunks
    .map((f) => {
      const code = readFileSync(join(js, f));
      return { chunk: f, 'raw KB': kb(code.length), 'gzip KB': kb(gzipSync(code, { level: 6 }).length) };
    })
    .sort((a, b) => b['raw KB'] - a['raw KB']);
  const e = rows.find((r) => r.chunk === entry)!;
  console.log('web chunks (zlib level 6)');
  console.table(rows);
  console.table([
    {
      chunk: 'entry',
      'raw KB': e['raw KB'],
      'target raw KB': kb(TARGET_RAW),
      'raw / target': Number(((e['raw KB'] * 1e3) / TARGET_RAW).toFixed(2)),
      'gzip KB': e['gzip KB'],
      'target gzip KB': kb(TARGET_GZIP),
      'gzip / target': Number(((e['gzip KB'] * 1e3) / TARGET_GZIP).toFixed(2)),
    },
  ]);
  const assets = statSync(dir).isDirectory() ? readdirSync(dir, { recursive: true, withFileTypes: true }) : [];
  const total = assets
    .filter((d) => d.isFile() && !d.name.endsWith('.map'))
    .reduce((n, d) => n + statSync(join(d.parentPath, d.name)).size, 0);
  console.log(`whole export without source maps: ${kb(total)} KB`);

  const mapFile = join(js, `${entry}.map`);
  if (!existsSync(mapFile)) {
    console.log(`no ${entry}.map: export with --source-maps to see the modules`);
    return;
  }
  const code = readFileSync(join(js, entry), 'utf8');
  const by = bytesBySource(code, JSON.parse(readFileSync(mapFile, 'utf8')));
  const entryBytes = Buffer.byteLength(code);
  const share = (n: number) => `${((100 * n) / entryBytes).toFixed(1)} %`;
  const top = [...by.entries()].sort((a, b) => b[1] - a[1]).slice(0, 20);
  console.log(`largest modules of the entry (of ${by.size} sources; minified bytes through the source map)`);
  const rel = (source: string) =>
    (source.startsWith(`${ROOT}/`) ? source.slice(ROOT.length + 1) : source).replace(/^\//, '');
  console.table(top.map(([source, n]) => ({ module: rel(source), KB: kb(n), share: share(n) })));
  const groups = new Map<string, number>();
  for (const [source, n] of by) groups.set(groupOf(source), (groups.get(groupOf(source)) ?? 0) + n);
  console.log('largest packages and project folders of the entry');
  console.table(
    [...groups.entries()]
      .sort((a, b) => b[1] - a[1])
      .slice(0, 20)
      .map(([group, n]) => ({ group, KB: kb(n), share: share(n) })),
  );
}
