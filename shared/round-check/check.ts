/**
 * The round check: analyseRound (shared/cycle) on the unit-level readings of a round
 * (./assemble.ts), turned into what a technician acts on before leaving the unit:
 *  - one line per piece of equipment saying, in plain words, whether its balances close, do not
 *    close, or cannot be formed yet (and which readings are missing);
 *  - the suspects with the engine's message and what the rest of the plant says they should read;
 *  - a short re-take list in walking order ("Stop 3, Steam drum: TI-101 — reads about 6 K high
 *    against the boiling point at the pressure PI-101 reads"); instruments read on another round
 *    are listed apart (they cannot be re-taken on this one).
 * The phone and the server run this same function on the same inputs; `fingerprint` is a short
 * hash of the result (numbers to 9 significant figures) that both sides can compare.
 */
import { analyseRound } from '../cycle/analyse';
import { showDelta, showValue, showWithSpread, type Shown } from '../cycle/format';
import { canonicalJson, fnv1a64, portUses, type Instrument } from '../cycle/model';
import type { Finding, FindingKind, RoundAnalysis } from '../cycle/types';
import type { PressureRef, Unit } from '../units';
import { assembleRoundCheck, type AssembledRoundCheck, type RoundCheckInput } from './assemble';

export type BalanceStatus = 'closes' | 'open' | 'incomplete';

export interface BalanceLine {
  equipmentId: string;
  label: string;
  status: BalanceStatus;
  /** the whole line in plain words */
  text: string;
  /** for `incomplete`: the instruments without a reading that would let it be formed */
  missing: string[];
}

export interface RetakeItem {
  tag: string;
  /** stop index on this round's route (0-based); null for an instrument of another route */
  stop: number | null;
  stopName: string | null;
  /** the reading the check found fault with (the one a re-take supersedes) */
  readingId: string | null;
  /** the round the reading belongs to, and its route */
  roundId: string | null;
  routeName: string | null;
  own: boolean;
  kind: FindingKind;
  /** "reads about 6 K high against …" (after the tag) */
  text: string;
  /** "Stop 3, Steam drum: TI-101 — reads about 6 K high against …" */
  line: string;
  /** the engine's messages about this instrument, most severe first */
  messages: string[];
  severity: 1 | 2 | 3;
  /** the technician's reason, when the flag on the current reading was dismissed */
  dismissed: string | null;
}

export interface SuspectView {
  tag: string;
  label: string;
  message: string;
  reading: number;
  estimate: number | null;
  estimateSigma: number | null;
  /** as the gauge shows it: "136.5 °C" */
  readingText: string;
  /** "130.5 °C ± 1.3 K" (coverage factor 2) */
  estimateText: string | null;
  own: boolean;
}

export interface RoundCheck {
  modelId: string;
  modelVersion: string;
  fingerprint: string;
  analysis: RoundAnalysis;
  assembled: AssembledRoundCheck;
  /** nothing to re-take (dismissed flags aside) and no balance open */
  clean: boolean;
  /** every balance of the model can be formed from the readings */
  complete: boolean;
  retakes: RetakeItem[];
  /** flagged instruments read on another round */
  elsewhere: RetakeItem[];
  suspects: SuspectView[];
  balances: BalanceLine[];
  /** reconciliation notes (nothing to check, failed) */
  notes: string[];
}

const RETAKE_KINDS: ReadonlySet<FindingKind> = new Set<FindingKind>([
  'gross-error',
  'gauge-read-as-absolute',
  'absolute-read-as-gauge',
  'twin-disagreement',
  'saturation-mismatch',
  'phase-mismatch',
  'out-of-range',
  'outside-if97',
  'stuck-value',
  'invalid-reading',
]);

const fin = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);
const num = (x: unknown): number | null => (fin(x) ? x : null);

function shownOf(i: Instrument): Shown {
  return {
    quantity: i.quantity,
    unit: i.unit as Unit,
    ...(i.pressureReference ? { reference: i.pressureReference as PressureRef } : {}),
  };
}

function joinNames(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

const lcFirst = (t: string) => (t.length > 1 && t[1] === t[1].toLowerCase() ? t[0].toLowerCase() + t.slice(1) : t);

/** "about 6 K", "about 0.43 bar": two significant figures of a difference in the gauge's unit */
function about(s: Shown, deltaSI: number): string {
  const full = showDelta(s, Math.abs(deltaSI));
  const m = /^(-?[\d.]+) (.+)$/.exec(full);
  if (!m) return `about ${full}`;
  return `about ${String(Number(Number(m[1]).toPrecision(2)))} ${m[2]}`;
}

/** What an instrument is wrong against, in words, for one finding. */
function retakeText(f: Finding, tag: string, inst: Instrument, b: number, ptLabel: (id: string) => string): string {
  const s = shownOf(inst);
  const e = f.evidence;
  switch (f.kind) {
    case 'gross-error': {
      const m = / (above|below) what (.+?) allows? \(/.exec(f.message);
      const d = num(e.difference);
      const alike = Array.isArray(e.alsoSuspect) ? (e.alsoSuspect as readonly string[]) : [];
      if (tag !== f.instrumentTags[0]) {
        return `cannot be told apart from ${f.instrumentTags[0]} by the balances: re-take both`;
      }
      const or = alike.length ? ` (or ${joinNames([...alike])}: the balances cannot tell them apart)` : '';
      if (m && d !== null) return `reads ${about(s, d)} ${m[1] === 'above' ? 'high' : 'low'} against ${m[2]}${or}`;
      return `disagrees with the rest of the plant${or}`;
    }
    case 'gauge-read-as-absolute':
      return inst.pressureReference === 'vacuum'
        ? 'looks like the vacuum was entered as an absolute pressure'
        : 'looks entered as absolute: it is off by about the barometric pressure';
    case 'absolute-read-as-gauge':
      return 'looks entered as gauge: it is off by about the barometric pressure';
    case 'twin-disagreement': {
      const other = f.instrumentTags.find((t) => t !== tag) ?? '';
      const d = num(e.difference);
      return `disagrees with its twin ${other}${d !== null ? ` by ${about(s, d)}` : ''}`;
    }
    case 'saturation-mismatch': {
      const d = num(e.difference);
      const pTags = f.instrumentTags.filter((t) => t.startsWith('PI'));
      const tTags = f.instrumentTags.filter((t) => !t.startsWith('PI'));
      const where = f.pointId ? ` (${lcFirst(ptLabel(f.pointId))})` : '';
      if (inst.quantity === 'temperature' && d !== null) {
        return `reads ${about(s, d)} ${d > 0 ? 'high' : 'low'} against the boiling point at the pressure ${joinNames(pTags)} read${pTags.length > 1 ? '' : 's'}${where}`;
      }
      return `its pressure and ${joinNames(tTags)} do not agree at saturation${where}`;
    }
    case 'phase-mismatch':
      return `this reading and ${joinNames(f.instrumentTags.filter((t) => t !== tag))} do not fit the expected phase${f.pointId ? ` at ${lcFirst(ptLabel(f.pointId))}` : ''}`;
    case 'out-of-range':
      return `reads ${showValue(s, num(e.value) ?? 0, b, 0)}, outside its scale`;
    case 'outside-if97':
      return 'reads outside what the steam tables cover';
    case 'stuck-value':
      return `has read the same value on the last ${String(e.rounds ?? 3)} rounds while its neighbours moved`;
    case 'invalid-reading':
      return 'the reading could not be used';
    default:
      return f.message;
  }
}

const KIND_WORDS: Record<string, string> = {
  mass: 'mass',
  energy: 'energy',
  duty: 'steam-side heat against cooling water',
  power: 'turbine work against generator output',
};

function showSIShort(x: number, unit: 'kg/s' | 'W' | 'J/kg'): string {
  if (unit === 'W') {
    const a = Math.abs(x);
    if (a >= 1e6) return `${(x / 1e6).toFixed(2)} MW`;
    if (a >= 1e3) return `${(x / 1e3).toFixed(1)} kW`;
    return `${x.toFixed(0)} W`;
  }
  if (unit === 'J/kg') return `${(x / 1e3).toFixed(1)} kJ/kg`;
  return `${x.toFixed(2)} kg/s`;
}

function balanceLines(
  analysis: RoundAnalysis,
  model: { instruments: Instrument[]; equipment: { id: string; kind: string; sections?: string[] }[] },
): BalanceLine[] {
  const missingTags = new Set(
    analysis.instruments.filter((i) => i.status === 'missing' || i.status === 'excluded').map((i) => i.tag),
  );
  const eqById = new Map(model.equipment.map((e) => [e.id, e]));
  const lines: BalanceLine[] = [];
  for (const eb of analysis.balances) {
    const rows = eb.rows.filter((r) => r.kind !== 'enthalpy');
    if (rows.length === 0) continue;
    const e = eqById.get(eb.equipmentId);
    const label = eb.label;
    const incomplete = rows.filter((r) => r.measured === null);
    if (incomplete.length) {
      const pts = new Set<string>();
      const hosts = e?.kind === 'generator' ? (e.sections ?? []).map((id) => eqById.get(id)).filter(Boolean) : [e];
      for (const h of hosts) for (const u of portUses(h as Parameters<typeof portUses>[0])) pts.add(u.point);
      const missing = model.instruments
        .filter(
          (i) =>
            ((i.point && pts.has(i.point)) || i.equipment === eb.equipmentId) &&
            i.quantity !== 'level' &&
            missingTags.has(i.tag),
        )
        .map((i) => i.tag);
      const kinds = [...new Set(incomplete.map((r) => KIND_WORDS[r.kind] ?? r.kind))];
      const what = `${joinNames(kinds)} balance${kinds.length > 1 ? 's' : ''}`;
      lines.push({
        equipmentId: eb.equipmentId,
        label,
        status: 'incomplete',
        missing,
        text: missing.length
          ? `${label}: the ${what} cannot be formed yet — no reading of ${joinNames(missing)}.`
          : `${label}: the ${what} cannot be formed from these readings.`,
      });
      continue;
    }
    const open = analysis.findings.filter((f) => f.kind === 'balance-not-closed' && f.equipmentId === eb.equipmentId);
    if (open.length) {
      lines.push({
        equipmentId: eb.equipmentId,
        label,
        status: 'open',
        missing: [],
        text: open.map((f) => f.message).join(' '),
      });
      continue;
    }
    const main = rows.find((r) => r.kind !== 'mass') ?? rows[0];
    const m = main.measured!;
    const against = main.kind === 'power' || main.kind === 'duty';
    const figure = against
      ? `${showSIShort(m.in, main.unit)} against ${showSIShort(m.out, main.unit)}`
      : `${showSIShort(m.in, main.unit)} in, ${showSIShort(m.out, main.unit)} out`;
    const kinds = [...new Set(rows.filter((r) => r.kind === 'mass' || r.kind === 'energy').map((r) => r.kind))];
    const parts: string[] = [];
    if (kinds.length) parts.push(`${joinNames(kinds)} balance${kinds.length > 1 ? 's close' : ' closes'}`);
    if (rows.some((r) => r.kind === 'duty')) parts.push('the steam-side heat matches the cooling water');
    if (rows.some((r) => r.kind === 'power')) parts.push('the turbine work matches the generator output');
    const words = joinNames(parts);
    lines.push({
      equipmentId: eb.equipmentId,
      label,
      status: 'closes',
      missing: [],
      text: `${label}: ${words} (${figure}).`,
    });
  }
  return lines;
}

/** 9 significant figures: the fingerprint does not see the last bits of a floating-point sum */
function round9(v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) ? Number(v.toPrecision(9)) : String(v);
  if (Array.isArray(v)) return v.map(round9);
  if (v && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, round9(x)]));
  return v;
}

/** A short hash of what the check found: findings, suspects and their estimates, the figures. */
export function roundCheckFingerprint(a: RoundAnalysis): string {
  const rec = a.reconciliation;
  const body = {
    modelVersion: a.modelVersion,
    findings: a.findings.map((f) => ({
      kind: f.kind,
      severity: f.severity,
      tags: f.instrumentTags,
      message: f.message,
      evidence: f.evidence,
    })),
    suspects: rec.ok ? rec.suspects : [],
    chiSquare: rec.ok ? [rec.chiSquare, rec.final.chiSquare] : rec.error.code,
    instruments: a.instruments.map((i) => [i.tag, i.status, i.reading, i.estimate, i.estimateSigma, i.suspect]),
    performance: a.performance.map((p) => [p.id, p.value, p.measured]),
  };
  return `fnv1a64:${fnv1a64(canonicalJson(round9(body)))}`;
}

/** Runs the round check: assembly, analyseRound, the re-take list and the balance lines. */
export function checkRound(input: RoundCheckInput): RoundCheck {
  const assembled = assembleRoundCheck(input);
  const analysis = analyseRound(input.model, assembled.readings, assembled.context);
  const model = input.model as {
    instruments: Instrument[];
    equipment: { id: string; kind: string; sections?: string[] }[];
    points: { id: string; label: string }[];
  };
  const instByTag = new Map(model.instruments.map((i) => [i.tag, i]));
  const ptLabel = (id: string) => model.points.find((p) => p.id === id)?.label ?? id;
  const b = assembled.context.barometricPa;
  const stops = input.round.stops;

  // dismissals that still apply: made on the reading that is current now
  const dismissedNote = (tag: string): string | null => {
    const src = assembled.sources[tag];
    const list = (input.dismissals ?? []).filter(
      (d) => d.tag === tag && (!d.readingId || (src && d.readingId === src.readingId)),
    );
    return list.length ? list[list.length - 1].note : null;
  };

  // a plain check that names several instruments (twins, saturation, phase) where the
  // reconciliation has singled one out: only the suspect is to be re-taken
  const suspectSet = new Set(analysis.reconciliation.ok ? analysis.reconciliation.suspects : []);
  const SHARED: ReadonlySet<FindingKind> = new Set<FindingKind>([
    'twin-disagreement',
    'saturation-mismatch',
    'phase-mismatch',
  ]);
  const items = new Map<string, RetakeItem>();
  for (const f of analysis.findings) {
    if (!RETAKE_KINDS.has(f.kind)) continue;
    const narrowed = SHARED.has(f.kind) && f.instrumentTags.some((t) => suspectSet.has(t));
    for (const tag of f.instrumentTags) {
      const inst = instByTag.get(tag);
      if (!inst) continue;
      const had = items.get(tag);
      if (had) {
        if (!had.messages.includes(f.message)) had.messages.push(f.message);
        continue;
      }
      if (narrowed && !suspectSet.has(tag)) continue;
      const src = assembled.sources[tag] ?? null;
      const w = assembled.walk[tag];
      const own = !!w;
      const text = retakeText(f, tag, inst, b, ptLabel);
      const stopName = w ? stops[w.stop].name : null;
      const other = src && !src.own ? assembled.borrowed.find((r) => r.roundId === src.roundId) : undefined;
      items.set(tag, {
        tag,
        stop: w ? w.stop : null,
        stopName,
        readingId: src?.readingId ?? null,
        roundId: src?.roundId ?? null,
        routeName: own ? input.round.routeName : (other?.routeName ?? null),
        own,
        kind: f.kind,
        text,
        line: w
          ? `Stop ${w.stop + 1}, ${stopName}: ${tag} — ${text}`
          : `${tag} (${other ? `${other.routeName} round` : 'another round'}) — ${text}`,
        messages: [f.message],
        severity: f.severity,
        dismissed: dismissedNote(tag),
      });
    }
  }
  const all = [...items.values()];
  const retakes = all
    .filter((i) => i.own)
    .sort((a, c) => a.stop! - c.stop! || assembled.walk[a.tag].position - assembled.walk[c.tag].position);
  const elsewhere = all.filter((i) => !i.own);

  const suspects: SuspectView[] = [];
  const rec = analysis.reconciliation;
  if (rec.ok) {
    for (const tag of rec.suspects) {
      const ir = analysis.instruments.find((i) => i.tag === tag);
      const inst = instByTag.get(tag);
      if (!ir || !inst || ir.reading === null) continue;
      const s = shownOf(inst);
      const f = analysis.findings.find((x) => x.kind === 'gross-error' && x.instrumentTags[0] === tag);
      suspects.push({
        tag,
        label: inst.label ?? tag,
        message: f?.message ?? `${tag} disagrees with the rest of the plant.`,
        reading: ir.reading,
        estimate: ir.estimate,
        estimateSigma: ir.estimateSigma,
        readingText: showValue(s, ir.reading, b, ir.sigma ?? 0),
        estimateText:
          ir.estimate !== null && ir.estimateSigma !== null
            ? showWithSpread(s, ir.estimate, 2 * ir.estimateSigma, b)
            : null,
        own: tag in assembled.walk,
      });
    }
  }

  const notes: string[] = [];
  for (const f of analysis.findings) if (f.kind === 'reconciliation-failed') notes.push(f.message);

  const balances = balanceLines(analysis, model);
  const clean = all.every((i) => i.dismissed !== null) && !balances.some((l) => l.status === 'open');
  return {
    modelId: analysis.modelId,
    modelVersion: analysis.modelVersion,
    fingerprint: roundCheckFingerprint(analysis),
    analysis,
    assembled,
    clean,
    complete: !balances.some((l) => l.status === 'incomplete'),
    retakes,
    elsewhere,
    suspects,
    balances,
    notes,
  };
}
