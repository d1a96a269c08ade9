import { demoDesignReadings, demoUnit, analyseRound } from './shared/cycle';
import { detectabilityMap } from './shared/cycle/detectability';
const b = 101325;
const a = analyseRound(demoUnit, demoDesignReadings(b), { barometricPa: b });
const rs = a.instruments.filter((i) => i.reading !== null && i.sigma !== null).map((i) => ({ tag: i.tag, value: i.reading!, sigma: i.sigma! }));
const t0 = performance.now();
const m = detectabilityMap(demoUnit, rs);
console.log('ms', performance.now() - t0, 'delta0', m.delta0);
for (const r of m.instruments) console.log(r.tag.padEnd(8), r.status.padEnd(9), r.redundancy?.toFixed(3), r.mdb?.toPrecision(3), r.sigma?.toPrecision(3), r.remedy ? JSON.stringify(r.remedy) : '');
