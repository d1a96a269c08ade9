/**
 * The round check on a phone-class processor: shared/round-check checkRound on a demo round (the
 * turbine hall with TI-206 6 K high, the boiler-house and condenser rounds borrowed for the rest of
 * the unit — what the round-check screen runs at the finish), bundled with esbuild and run in Debian's
 * chromium with the CPU unthrottled and throttled 4× (Chrome DevTools Protocol
 * Emulation.setCPUThrottlingRate). "first" is the first check in a fresh page (nothing compiled
 * yet: what the technician waits for at the finish), "again" the median of the next ones (a
 * re-take re-runs it). The same again in a Web Worker of the page (where the web build runs it),
 * to see whether the throttling reaches workers. Baseline, timed in this process: the same call in node.
 * The budget is 100 ms on the 4× throttled processor.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const ENTRY = `
import { fernhallowRoutes } from '@/demo/routes';
import { demoDesignReadings, demoUnit } from '@/demo/unit';
import { checkRound, stopsOf } from '@/shared/round-check';
import { barometricFromElevation } from '@/shared/units';
const B = barometricFromElevation(112);
const design = demoDesignReadings(B);
const T0 = Date.UTC(2025, 10, 30, 7, 0);
function roundOf(key, start, change) {
  const t = fernhallowRoutes.find((r) => r.id === key);
  const tags = t.stops.flatMap((s) => s.readings.map((r) => r.tag));
  return { id: 'round-' + key, routeId: key, routeName: t.name, stops: stopsOf(t), startedAt: start, finishedAt: null, status: 'in-progress', barometricPa: B,
    readings: design.filter((r) => tags.includes(r.instrumentTag)).map((r, i) => ({ id: key + '-' + r.instrumentTag, tag: r.instrumentTag, valueSI: r.valueSI + ((change || {})[r.instrumentTag] || 0), time: start + i * 60000, order: i })) };
}
export function input() {
  return { model: demoUnit, round: roundOf('turbine-hall', T0 + 7.2e6, { 'TI-206': 6 }), others: [roundOf('boiler-house', T0), roundOf('condenser-cooling-water', T0 + 3.6e6)], at: T0 + 1.08e7 };
}
export function once() {
  const i = input();
  const t = performance.now();
  const r = checkRound(i);
  const ms = performance.now() - t;
  if (r.retakes[0]?.tag !== 'TI-206') throw new Error('the check did not name TI-206');
  return ms;
}
globalThis.__roundCheckBench = once;
`;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

export async function run(): Promise<void> {
  const esbuild = await import('esbuild');
  const dir = join(__dirname, '..', '.tmp', 'bench');
  mkdirSync(dir, { recursive: true });
  const entry = join(dir, 'device-round-check-entry.ts');
  writeFileSync(entry, ENTRY);
  const built = await esbuild.build({
    entryPoints: [entry],
    bundle: true,
    format: 'iife',
    platform: 'browser',
    target: 'es2020',
    write: false,
    tsconfig: join(__dirname, '..', 'tsconfig.json'),
    logLevel: 'error',
  });
  const code = built.outputFiles[0].text;

  // baseline: the same bundle's function in node (first call, then the median of 15)
  const sandbox: { __roundCheckBench?: () => number } = {};
  new Function('globalThis', code)(sandbox);
  const nodeFirst = sandbox.__roundCheckBench!();
  const nodeAgain = median(Array.from({ length: 15 }, () => sandbox.__roundCheckBench!()));

  const { launch } = await import('../tests/e2e/helpers/browser');
  const browser = await launch();
  const rows: { where: string; first: number; again: number }[] = [
    { where: 'node (baseline)', first: nodeFirst, again: nodeAgain },
  ];
  try {
    for (const rate of [1, 4]) {
      const firsts: number[] = [];
      const agains: number[] = [];
      for (let k = 0; k < 3; k++) {
        const context = await browser.newContext();
        const page = await context.newPage();
        const cdp = await context.newCDPSession(page);
        await cdp.send('Emulation.setCPUThrottlingRate', { rate });
        await page.addScriptTag({ content: code });
        firsts.push((await page.evaluate('globalThis.__roundCheckBench()')) as number);
        const xs: number[] = [];
        for (let i = 0; i < 10; i++) xs.push((await page.evaluate('globalThis.__roundCheckBench()')) as number);
        agains.push(median(xs));
        await context.close();
      }
      rows.push({ where: `chromium, CPU ${rate}×`, first: median(firsts), again: median(agains) });
    }
    // the same in a Web Worker of a throttled page (the app's web build runs the check there)
    for (const rate of [1, 4]) {
      const firsts: number[] = [];
      const agains: number[] = [];
      for (let k = 0; k < 3; k++) {
        const context = await browser.newContext();
        const page = await context.newPage();
        const cdp = await context.newCDPSession(page);
        await cdp.send('Emulation.setCPUThrottlingRate', { rate });
        await page.evaluate(
          `globalThis.__code = ${JSON.stringify(code + ';onmessage = () => { const xs = []; for (let i = 0; i < 11; i++) xs.push(globalThis.__roundCheckBench()); postMessage(xs); };')}`,
        );
        const xs = (await page.evaluate(`new Promise((resolve) => {
          const w = new Worker(URL.createObjectURL(new Blob([globalThis.__code], { type: 'text/javascript' })));
          w.onmessage = (e) => resolve(e.data);
          w.postMessage(0);
        })`)) as number[];
        firsts.push(xs[0]);
        agains.push(median(xs.slice(1)));
        await context.close();
      }
      rows.push({ where: `chromium Web Worker, page CPU ${rate}×`, first: median(firsts), again: median(agains) });
    }
  } finally {
    await browser.close();
  }
  console.log('round check of a demo round (checkRound: assembly, analyseRound, re-take list)');
  console.log('| where | first check (ms) | again (ms, median) | ratio to node (again) |');
  console.log('| --- | ---: | ---: | ---: |');
  for (const r of rows)
    console.log(`| ${r.where} | ${r.first.toFixed(1)} | ${r.again.toFixed(1)} | ${(r.again / nodeAgain).toFixed(2)} |`);
  const t4 = rows.find((r) => r.where === 'chromium, CPU 4×')!;
  console.log(
    `budget 100 ms on the 4× throttled processor: first ${t4.first.toFixed(0)} ms, again ${t4.again.toFixed(0)} ms`,
  );
}
