/**
 * One instrument master: the unit's instrument rows (table `instruments` on the server, the same
 * rows from the pull on the phone) are the single source of an instrument's quantity, face unit,
 * pressure reference, range, accuracy specification (with its reading resolution), calibration
 * interval and status. The cycle model refers to instruments by tag; `effectiveModel` lays the rows
 * over the model's instrument entries, so the analysis, the phone's checks and the admin screen read
 * the same record:
 *  - a row's range, accuracy (when it is a valid accuracy specification), quantity, face unit and
 *    pressure reference replace the model's;
 *  - an instrument whose row is out of service leaves the model (and a twin pointing at it loses
 *    the twin): its readings are not reconciled, and `outOfService` names it;
 *  - a model instrument with no row keeps the model's entry.
 * The effective version is "fnv1a64:" + the hash of the canonical JSON of the published model's
 * version and the rows it uses (in tag order, the fields above, calibration interval and status
 * included), so every instrument edit gives a new version that the round (from the phone) and its
 * analysis (on the server) record. The effective model itself carries its content hash as its
 * `version` (the engine checks that), which changes only with what the physics reads.
 * Pure, browser-safe: the phone and the server run it on the same rows and agree to the digit.
 */
import { accuracySpecSchema } from '../uncertainty';
import { canonicalJson, fnv1a64, modelVersion, type CycleModel, type Instrument } from './model';

/** The fields of an instrument row that the model takes from the master (server row or pulled row). */
export interface MasterInstrumentRow {
  tag: string;
  quantity: Instrument['quantity'];
  reference: Instrument['pressureReference'] | null;
  range: { min: number; max: number } | null;
  accuracy: unknown;
  gaugeUnit: string;
  calibrationIntervalDays: number | null;
  /** 'ok' | 'suspect' | 'out-of-service' (shared/api/sync INSTRUMENT_STATUSES) */
  status: string;
}

export const OUT_OF_SERVICE = 'out-of-service';

export interface EffectiveModel {
  /** the model with the master's values; its `version` is its own content hash (what the engine checks) */
  model: CycleModel;
  /** the effective version (the published model's version + the instrument rows it uses): rounds and analyses record it */
  version: string;
  /** tags of the model's instruments that are out of service (not reconciled), in model order */
  outOfService: string[];
}

/** The model as the instrument master has it (see the file comment). */
export function effectiveModel(model: CycleModel, rows: readonly MasterInstrumentRow[]): EffectiveModel {
  const byTag = new Map(rows.map((r) => [r.tag, r]));
  const used: Record<string, unknown>[] = [];
  const outOfService: string[] = [];
  const kept: Instrument[] = [];
  for (const inst of model.instruments) {
    const row = byTag.get(inst.tag);
    if (!row) {
      kept.push(inst);
      continue;
    }
    used.push({
      tag: row.tag,
      quantity: row.quantity,
      reference: row.reference ?? null,
      range: row.range ? { min: row.range.min, max: row.range.max } : null,
      accuracy: row.accuracy ?? null,
      gaugeUnit: row.gaugeUnit,
      calibrationIntervalDays: row.calibrationIntervalDays ?? null,
      status: row.status,
    });
    if (row.status === OUT_OF_SERVICE) {
      outOfService.push(inst.tag);
      continue;
    }
    const accuracy = accuracySpecSchema.safeParse(row.accuracy);
    const next: Instrument = {
      ...inst,
      quantity: row.quantity,
      unit: row.gaugeUnit,
      ...(row.range ? { range: { min: row.range.min, max: row.range.max } } : {}),
      ...(accuracy.success ? { accuracy: accuracy.data } : {}),
    };
    if (row.quantity === 'pressure' && row.reference) next.pressureReference = row.reference;
    kept.push(next);
  }
  const gone = new Set(outOfService);
  const instruments = kept.map((i) => {
    if (i.twin === undefined || !gone.has(i.twin)) return i;
    const { twin: _twin, ...rest } = i;
    return rest;
  });
  used.sort((a, b) => (String(a.tag) < String(b.tag) ? -1 : String(a.tag) > String(b.tag) ? 1 : 0));
  const { version: _published, ...content } = { ...model, instruments };
  // the engine checks that a model's version is its content hash: the effective model carries its own
  const contentVersion = modelVersion(content);
  const version = `fnv1a64:${fnv1a64(canonicalJson({ model: model.version, instruments: used }))}`;
  return { model: { ...content, version: contentVersion }, version, outOfService };
}
