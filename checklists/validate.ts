/**
 * validateRoute(template, model?) → every problem of a route template, each with the path of the
 * field ("stops.2.readings.0.unit") and a message naming the value and what is allowed.
 *
 * Beyond the zod schema it checks: stop ids and check ids unique on the route, an instrument
 * read at most once per route, the tag known to the unit's model (when a model is given), the
 * unit known to shared/units and of the instrument's quantity (from the model, else from the
 * tag's ISA-5.1 first letter), a pressure reference given exactly for pressures (and matching
 * the model's when it has one), band min < max, choice options unique.
 */
import {
  isQuantity,
  lookupUnit,
  PRESSURE_REFERENCES,
  QUANTITY_NAMES,
  UNITS_BY_QUANTITY,
  type PressureRef,
  type Quantity,
} from '../shared/units';
import { RouteTemplate } from '../shared/route/template';

export interface RouteIssue {
  /** Dotted path into the template, "(template)" for the whole. */
  path: string;
  message: string;
}

/** What the validator needs of a unit's model (a shared/cycle CycleModel fits): its id and its instruments. */
export interface RouteModelInstrument {
  tag: string;
  quantity: Quantity | string;
  /** Pressure instruments: what the gauge reads against. */
  pressureReference?: PressureRef | null;
}
export interface RouteModel {
  id?: string;
  instruments: readonly RouteModelInstrument[];
}

export type RouteValidation = { ok: true; route: RouteTemplate; issues: [] } | { ok: false; issues: RouteIssue[] };

/**
 * Quantity of an ISA-5.1 tag from its first letter (ISA-5.1 table of identification letters:
 * P pressure, T temperature, F flow, L level, J power). Undefined for other letters.
 */
export function quantityFromTag(tag: string): Quantity | undefined {
  switch (tag[0]) {
    case 'P':
      return 'pressure';
    case 'T':
      return 'temperature';
    case 'F':
      return 'massFlow';
    case 'L':
      return 'level';
    case 'J':
      return 'power';
    default:
      return undefined;
  }
}

export class RouteTemplateError extends Error {
  constructor(
    readonly routeId: string,
    readonly issues: RouteIssue[],
  ) {
    super(
      `Route template ${JSON.stringify(routeId)} is invalid: ${issues.map((i) => `${i.path}: ${i.message}`).join('; ')}`,
    );
    this.name = 'RouteTemplateError';
  }
}

export function validateRoute(template: unknown, model?: RouteModel): RouteValidation {
  const parsed = RouteTemplate.safeParse(template);
  if (!parsed.success) {
    return {
      ok: false,
      issues: parsed.error.issues.map((i) => ({
        path: i.path.map(String).join('.') || '(template)',
        message: i.message,
      })),
    };
  }
  const route = parsed.data;
  const issues: RouteIssue[] = [];
  const add = (path: string, message: string) => issues.push({ path, message });

  const byTag = new Map<string, RouteModelInstrument>();
  if (model) {
    for (const inst of model.instruments) byTag.set(inst.tag, inst);
    if (model.id !== undefined && model.id !== route.unitId) {
      add('unitId', `is "${route.unitId}" but the model given is unit "${model.id}"`);
    }
  }

  const stopIds = new Map<string, number>();
  const checkIds = new Map<string, string>();
  const tags = new Map<string, string>();

  route.stops.forEach((stop, s) => {
    const sp = `stops.${s}`;
    const first = stopIds.get(stop.id);
    if (first !== undefined) add(`${sp}.id`, `stop id "${stop.id}" is used twice (first at stops.${first})`);
    else stopIds.set(stop.id, s);

    if (stop.readings.length === 0 && stop.checks.length === 0) {
      add(sp, `stop "${stop.id}" has no readings and no checks`);
    }

    stop.readings.forEach((r, k) => {
      const rp = `${sp}.readings.${k}`;
      const seen = tags.get(r.tag);
      if (seen !== undefined) add(`${rp}.tag`, `${r.tag} is read twice on this route (first at ${seen})`);
      else tags.set(r.tag, rp);

      let quantity: Quantity | undefined;
      let modelRef: PressureRef | null | undefined;
      if (model) {
        const inst = byTag.get(r.tag);
        if (!inst) {
          add(`${rp}.tag`, `${r.tag} is not an instrument of unit "${model.id ?? route.unitId}"`);
        } else if (!isQuantity(inst.quantity)) {
          add(`${rp}.tag`, `${r.tag} has quantity "${inst.quantity}" in the model, which shared/units does not know`);
        } else {
          quantity = inst.quantity;
          modelRef = inst.pressureReference;
        }
      } else {
        quantity = quantityFromTag(r.tag);
      }

      const unit = lookupUnit(r.unit);
      if (!unit) {
        add(
          `${rp}.unit`,
          `unknown unit "${r.unit}"${quantity ? `; a ${QUANTITY_NAMES[quantity]} takes ${UNITS_BY_QUANTITY[quantity].join(', ')}` : ''}`,
        );
      } else if (quantity && unit.quantity !== quantity) {
        add(
          `${rp}.unit`,
          `"${r.unit}" is a ${QUANTITY_NAMES[unit.quantity]} unit but ${r.tag} measures ${QUANTITY_NAMES[quantity]}; ` +
            `allowed: ${UNITS_BY_QUANTITY[quantity].join(', ')}`,
        );
      } else if (unit.unit !== r.unit) {
        add(`${rp}.unit`, `write the unit as "${unit.unit}", not "${r.unit}"`);
      }

      const isPressure = (quantity ?? unit?.quantity) === 'pressure';
      if (isPressure && r.reference === undefined) {
        add(`${rp}.reference`, `${r.tag} is a pressure: say what it reads against (${PRESSURE_REFERENCES.join(', ')})`);
      } else if (!isPressure && r.reference !== undefined && (quantity ?? unit?.quantity) !== undefined) {
        add(`${rp}.reference`, `${r.tag} is not a pressure and takes no reference, got "${r.reference}"`);
      } else if (isPressure && modelRef && r.reference !== modelRef) {
        add(`${rp}.reference`, `is "${r.reference}" but ${r.tag} reads ${modelRef} in the model`);
      }

      if (r.band.min >= r.band.max) {
        add(`${rp}.band`, `min ${r.band.min} must be below max ${r.band.max} (${r.unit})`);
      }
    });

    stop.checks.forEach((c, k) => {
      const cp = `${sp}.checks.${k}`;
      const seen = checkIds.get(c.id);
      if (seen !== undefined) add(`${cp}.id`, `check id "${c.id}" is used twice on this route (first at ${seen})`);
      else checkIds.set(c.id, cp);
      if (c.kind === 'choice') {
        const opts = new Set<string>();
        c.options.forEach((o, j) => {
          if (opts.has(o)) add(`${cp}.options.${j}`, `option "${o}" is listed twice`);
          opts.add(o);
        });
      }
    });
  });

  return issues.length ? { ok: false, issues } : { ok: true, route, issues: [] };
}

/** The template parsed and validated, or a RouteTemplateError listing every issue. */
export function parseRoute(template: unknown, model?: RouteModel): RouteTemplate {
  const r = validateRoute(template, model);
  if (!r.ok) {
    const id =
      typeof template === 'object' && template && 'id' in template ? String((template as { id: unknown }).id) : '?';
    throw new RouteTemplateError(id, r.issues);
  }
  return r.route;
}

/** Every check of a route by id, with its stop (for answering and validating answers). */
export function checksById(route: RouteTemplate): Map<string, RouteTemplate['stops'][number]['checks'][number]> {
  const out = new Map<string, RouteTemplate['stops'][number]['checks'][number]>();
  for (const stop of route.stops) for (const c of stop.checks) out.set(c.id, c);
  return out;
}
