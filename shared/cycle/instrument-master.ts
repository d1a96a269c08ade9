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
 * The effective version is the content hash of the effective model (shared/cycle modelVersion):
 * it is the published version while the rows agree with the model, and every edit the physics reads
 * (range, accuracy class or resolution, face unit, reference, out of service) gives a new one, which
 * the round (from the phone) and its analysis (on the server) record. An edit the physics does not
 * read (calibration interval, the status "suspect") leaves it as it is.
 * Pure, browser-safe: the phone and the server run it on the same rows and agree to the digit.
 */
import { accuracySpecSchema } from '../uncertainty';
import { modelVersion, type CycleModel, type Instrument } from './model';

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
  /** the model with the master's values; its `version` is the effective version */
  model: CycleModel;
  /** the effective version: the content hash of the effective model; rounds and analyses record it */
  version: string;
  /** tags of the model's instruments that are out of service (not reconciled), in model order */
  outOfService: string[];
}

/** The model as the instrument master has it (see the file comment). */
export function effectiveModel(model: CycleModel, rows: readonly MasterInstrumentRow[]): EffectiveModel {
  const byTag = new Map(rows.map((r) => [r.tag, r]));
  const outOfService: string[] = [];
  const kept: Instrument[] = [];
  for (const inst of model.instruments) {
    const row = byTag.get(inst.tag);
    if (!row) {
      kept.push(inst);
      continue;
    }
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
  const { version: _published, ...content } = { ...model, instruments };
  // the engine checks that a model's version is its content hash: the effective model carries its own
  const version = modelVersion(content);
  return { model: { ...content, version }, version, outOfService };
}
