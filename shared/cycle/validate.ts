/**
 * validateModel: refuses a broken cycle model with messages that name the part. Pure.
 *
 * Checks, beyond the zod shape: unique ids and tags; every port tied to a known point; no point
 * with two producers or two consumers, none tied to nothing, none both inlet and outlet of one
 * equipment; samePressureAs known, not self, not circular; generator sections are turbine sections,
 * each on one generator, efficiency in (0, 1]; condenser cooling ports on liquid cooling-water
 * points, drum steam saturated vapour; every point has a source for its pressure; instruments on
 * a known point or equipment of the right kind for their quantity, a pressure instrument with a
 * reference and only it, range min < max, a unit of the quantity, a twin that exists and measures
 * the same quantity at the same place; the `version`, when given, equal to the content hash.
 */
import { unitInfo } from '../units';
import { cycleModelSchema, modelVersion, portUses, type CycleModel, type Equipment } from './model';

export interface ValidationError {
  /** where, e.g. "equipment[lp-heater].ports.steamIn", "instruments[TI-214].twin" */
  path: string;
  message: string;
}

export type ValidationResult = { ok: true; model: CycleModel } | { ok: false; errors: ValidationError[] };

const SATURATED = new Set(['saturated-liquid', 'saturated-vapour', 'two-phase']);

function zodPath(path: readonly PropertyKey[], raw: unknown): string {
  // name array members by their id or tag where the raw input has one
  let out = '';
  let node: unknown = raw;
  for (const k of path) {
    if (typeof k === 'number') {
      const item = Array.isArray(node) ? node[k] : undefined;
      const name =
        item && typeof item === 'object'
          ? ((item as Record<string, unknown>).id ?? (item as Record<string, unknown>).tag)
          : undefined;
      out += typeof name === 'string' && name.length > 0 ? `[${name}]` : `[${k}]`;
    } else out += out ? `.${String(k)}` : String(k);
    node = node && typeof node === 'object' ? (node as Record<PropertyKey, unknown>)[k] : undefined;
  }
  return out || '(model)';
}

/** Validates a cycle model; on success returns it parsed, with `version` set to its content hash. */
export function validateModel(input: unknown): ValidationResult {
  const parsed = cycleModelSchema.safeParse(input);
  if (!parsed.success) {
    return {
      ok: false,
      errors: parsed.error.issues.map((i) => ({ path: zodPath(i.path, input), message: i.message })),
    };
  }
  const m = parsed.data;
  const errors: ValidationError[] = [];
  const err = (path: string, message: string) => errors.push({ path, message });

  // unique ids
  const points = new Map<string, (typeof m.points)[number]>();
  for (const p of m.points) {
    if (points.has(p.id)) err(`points[${p.id}]`, `point id "${p.id}" is used twice`);
    points.set(p.id, p);
  }
  const equipment = new Map<string, Equipment>();
  for (const e of m.equipment) {
    if (equipment.has(e.id)) err(`equipment[${e.id}]`, `equipment id "${e.id}" is used twice`);
    equipment.set(e.id, e);
  }
  const instruments = new Map<string, (typeof m.instruments)[number]>();
  const instrumentIds = new Set<string>();
  for (const i of m.instruments) {
    if (instruments.has(i.tag)) err(`instruments[${i.tag}]`, `instrument tag ${i.tag} is used twice`);
    instruments.set(i.tag, i);
    if (i.id !== undefined) {
      if (instrumentIds.has(i.id)) err(`instruments[${i.tag}].id`, `instrument id "${i.id}" is used twice`);
      instrumentIds.add(i.id);
    }
  }

  // ports
  const producers = new Map<string, string[]>();
  const consumers = new Map<string, string[]>();
  const tied = new Set<string>();
  for (const e of m.equipment) {
    if (e.kind === 'generator') continue;
    const uses = portUses(e);
    const seenHere = new Map<string, string>();
    for (const u of uses) {
      const path = `equipment[${e.id}].ports.${u.port}`;
      if (!points.has(u.point)) {
        err(path, `${e.kind} ${e.id}: port ${u.port} is tied to unknown point "${u.point}"`);
        continue;
      }
      tied.add(u.point);
      const before = seenHere.get(u.point);
      if (before !== undefined)
        err(path, `${e.kind} ${e.id}: point ${u.point} is on two of its ports (${before} and ${u.port})`);
      seenHere.set(u.point, u.port);
      const list = u.role === 'out' ? producers : u.role === 'in' ? consumers : null;
      if (list) list.set(u.point, [...(list.get(u.point) ?? []), `${e.id}.${u.port}`]);
    }
    if (e.kind === 'mixer' && e.ports.inlets.length < 2)
      err(`equipment[${e.id}].ports.inlets`, `mixer ${e.id} needs at least two inlets`);
    if (e.kind === 'splitter' && e.ports.outlets.length < 2) {
      err(`equipment[${e.id}].ports.outlets`, `splitter ${e.id} needs at least two outlets`);
    }
    if (e.kind === 'condenser') {
      for (const port of ['coolingIn', 'coolingOut'] as const) {
        const p = points.get(e.ports[port]);
        if (p && p.phase !== 'liquid') {
          err(
            `equipment[${e.id}].ports.${port}`,
            `condenser ${e.id}: cooling-water point ${p.id} must be declared liquid, not ${p.phase}`,
          );
        }
        if (p && p.circuit !== 'cooling') {
          err(
            `points[${p.id}].circuit`,
            `point ${p.id} is on the cooling side of condenser ${e.id}: set circuit "cooling"`,
          );
        }
      }
    }
    if (e.kind === 'drum') {
      const s = points.get(e.ports.steam);
      if (s && s.phase !== 'saturated-vapour') {
        err(
          `equipment[${e.id}].ports.steam`,
          `drum ${e.id}: steam point ${s.id} must be declared saturated-vapour, not ${s.phase}`,
        );
      }
      const w = e.ports.water ? points.get(e.ports.water) : undefined;
      if (w && w.phase !== 'saturated-liquid') {
        err(
          `equipment[${e.id}].ports.water`,
          `drum ${e.id}: water point ${w.id} must be declared saturated-liquid, not ${w.phase}`,
        );
      }
    }
  }
  for (const [pt, by] of producers) {
    if (by.length > 1)
      err(`points[${pt}]`, `point ${pt} has two producers (${by.join(', ')}): a point leaves one equipment only`);
  }
  for (const [pt, by] of consumers) {
    if (by.length > 1)
      err(`points[${pt}]`, `point ${pt} has two consumers (${by.join(', ')}): split it with a splitter`);
  }
  for (const p of m.points) if (!tied.has(p.id)) err(`points[${p.id}]`, `point ${p.id} is tied to no equipment port`);

  // samePressureAs
  for (const p of m.points) {
    if (p.samePressureAs === undefined) continue;
    const path = `points[${p.id}].samePressureAs`;
    if (p.samePressureAs === p.id) err(path, `point ${p.id} says it has the pressure of itself`);
    else if (!points.has(p.samePressureAs))
      err(path, `point ${p.id}: samePressureAs names unknown point "${p.samePressureAs}"`);
    else {
      const chain = [p.id];
      let q = points.get(p.samePressureAs);
      while (q && q.samePressureAs !== undefined && !chain.includes(q.id)) {
        chain.push(q.id);
        q = points.get(q.samePressureAs);
      }
      if (q && chain.includes(q.id))
        err(path, `samePressureAs goes round in a circle: ${[...chain, q.id].join(' → ')}`);
    }
  }

  // generators
  const onShaft = new Map<string, string>();
  for (const e of m.equipment) {
    if (e.kind !== 'generator') continue;
    const path = `equipment[${e.id}]`;
    if (!(e.efficiency > 0 && e.efficiency <= 1))
      err(`${path}.efficiency`, `generator ${e.id}: efficiency ${e.efficiency} must lie in (0, 1]`);
    if (e.sections.length === 0) err(`${path}.sections`, `generator ${e.id} drives no turbine section`);
    for (const s of e.sections) {
      const t = equipment.get(s);
      if (!t) err(`${path}.sections`, `generator ${e.id}: section "${s}" is not an equipment of the model`);
      else if (t.kind !== 'turbine-section')
        err(`${path}.sections`, `generator ${e.id}: "${s}" is a ${t.kind}, not a turbine-section`);
      else if (onShaft.has(s))
        err(`${path}.sections`, `turbine section ${s} is on two generators (${onShaft.get(s)} and ${e.id})`);
      onShaft.set(s, e.id);
    }
  }

  // instruments
  const LEVEL_HOSTS = new Set(['drum', 'deaerator', 'condenser', 'closed-heater']);
  const measuresP = new Set<string>();
  const measuresT = new Set<string>();
  for (const i of m.instruments) {
    const path = `instruments[${i.tag}]`;
    const onPoint = i.quantity === 'pressure' || i.quantity === 'temperature' || i.quantity === 'massFlow';
    if (i.point !== undefined && i.equipment !== undefined)
      err(path, `${i.tag} names both a point and an equipment; give one`);
    if (onPoint) {
      if (i.point === undefined)
        err(`${path}.point`, `${i.tag} measures ${i.quantity} and must name the point it measures`);
      else if (!points.has(i.point)) err(`${path}.point`, `${i.tag} is on unknown point "${i.point}"`);
      else if (i.quantity === 'pressure') measuresP.add(i.point);
      else if (i.quantity === 'temperature') measuresT.add(i.point);
    } else {
      const e = i.equipment === undefined ? undefined : equipment.get(i.equipment);
      if (i.equipment === undefined)
        err(`${path}.equipment`, `${i.tag} measures ${i.quantity} and must name the equipment it is on`);
      else if (!e) err(`${path}.equipment`, `${i.tag} is on unknown equipment "${i.equipment}"`);
      else if (i.quantity === 'power' && e.kind !== 'generator')
        err(`${path}.equipment`, `${i.tag} measures power on ${e.id}, a ${e.kind}: power is read on a generator`);
      else if (i.quantity === 'level' && !LEVEL_HOSTS.has(e.kind)) {
        err(
          `${path}.equipment`,
          `${i.tag} measures a level on ${e.id}, a ${e.kind}: a level is read on a drum, deaerator, condenser or heater`,
        );
      }
    }
    if (i.quantity === 'pressure' && i.pressureReference === undefined) {
      err(
        `${path}.pressureReference`,
        `${i.tag} is a pressure instrument without a reference: say absolute, gauge or vacuum`,
      );
    }
    if (i.quantity !== 'pressure' && i.pressureReference !== undefined) {
      err(`${path}.pressureReference`, `${i.tag} measures ${i.quantity}: a pressure reference makes no sense for it`);
    }
    if (!Number.isFinite(i.range.min) || !Number.isFinite(i.range.max) || !(i.range.min < i.range.max)) {
      err(`${path}.range`, `${i.tag}: range min ${i.range.min} must be below max ${i.range.max}`);
    }
    const u = unitInfo(i.unit);
    if (!u) err(`${path}.unit`, `${i.tag}: unit "${i.unit}" is not a known unit`);
    else if (u.quantity !== i.quantity)
      err(
        `${path}.unit`,
        `${i.tag}: unit ${i.unit} is a ${u.quantity} unit, but the instrument measures ${i.quantity}`,
      );
    if (i.twin !== undefined) {
      const t = instruments.get(i.twin);
      if (i.twin === i.tag) err(`${path}.twin`, `${i.tag} names itself as its twin`);
      else if (!t) err(`${path}.twin`, `${i.tag}: twin ${i.twin} is not an instrument of the model`);
      else {
        if (t.quantity !== i.quantity)
          err(`${path}.twin`, `${i.tag} measures ${i.quantity} but its twin ${t.tag} measures ${t.quantity}`);
        if (t.point !== i.point || t.equipment !== i.equipment) {
          err(
            `${path}.twin`,
            `${i.tag} is on ${i.point ?? i.equipment} but its twin ${t.tag} is on ${t.point ?? t.equipment}`,
          );
        }
        if (t.twin !== undefined && t.twin !== i.tag)
          err(`${path}.twin`, `${i.tag} names ${t.tag} as twin, but ${t.tag} names ${t.twin}`);
      }
    }
  }

  // a source for every point's pressure
  for (const p of m.points) {
    if (measuresP.has(p.id) || p.samePressureAs !== undefined || p.nominal?.p !== undefined) continue;
    if (SATURATED.has(p.phase) && measuresT.has(p.id)) continue;
    err(
      `points[${p.id}]`,
      `point ${p.id} has no pressure instrument, no samePressureAs and no nominal pressure: its state cannot be fixed`,
    );
  }

  const version = modelVersion(m);
  if (m.version !== undefined && m.version !== version) {
    err(
      'version',
      `version "${m.version}" does not match the model's content hash ${version}; leave it out to have it computed`,
    );
  }
  if (errors.length > 0) return { ok: false, errors };
  return { ok: true, model: { ...m, version } };
}
