/**
 * The e-mail side of the Notifier (server/notify.ts):
 *  - workOrderOpened(id): each planner of the work order's site gets one message when a
 *    priority-1 order opens (again on a reopen);
 *  - assigned(id, userId): the assignee gets one;
 *  - findingsStored(roundId): the site's engineers get a digest of a shift's findings once the
 *    shift has closed (three 8-hour shifts in site-local time, ./shifts.ts): the round's own shift
 *    if it is over (a late sync), and the shift before the current one. sendDigest(siteId,
 *    shiftStart) sends one on demand; digestClosedShifts() checks every site (the sender loop
 *    calls it), so a digest goes out even when no round follows the shift.
 *
 * Messages go into the outbox (./outbox.ts) in a transaction of their own, with a dedupe key so a
 * repeated call sends nothing twice; the sender loop delivers them. Plain words, the work order's
 * number, title, instrument tag, priority and link path (/plan/work-orders/<id>), and the site
 * caution for hazards.
 */
import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/api/auth';
import { LEVEL_LABELS } from '../../shared/cycle/severity';
import type { Logger } from '../logger';
import type { Notifier } from '../notify';
import { enqueueMail, type OutgoingMail } from './outbox';
import { previousShift, shiftAt, shiftStartingAt, type ShiftWindow } from './shifts';

export const HAZARD_CAUTION =
  "Work on pressurised or hot equipment only under your site's permit and isolation procedures.";
export const SUBJECT_PREFIX = '[Trueround]';
/** Most findings listed in one digest; the rest are counted. */
export const DIGEST_MAX_ITEMS = 40;

export const workOrderPath = (id: string) => `/plan/work-orders/${id}`;

export interface WorkOrderFacts {
  id: string;
  siteId: string;
  siteName: string;
  /** "WO-0007" */
  code: string;
  title: string;
  kind: string;
  status: string;
  priority: number;
  instrumentTag: string | null;
  equipmentRef: string | null;
  reopenCount: number;
}

export interface Recipient {
  userId: string;
  email: string;
  name: string;
}

export interface SiteFacts {
  id: string;
  name: string;
  timezone: string;
}

export interface DigestFinding {
  roundId: string;
  routeName: string | null;
  /** when the round was walked (device time corrected by the push's clock skew) */
  at: Date;
  kind: string;
  severity: number;
  message: string;
  instrumentTags: string[];
}

/** What the notifier reads; sqlNotifierSource reads it from the database. */
export interface NotifierSource {
  workOrder(id: string): Promise<WorkOrderFacts | null>;
  /** active members of the site with the role */
  members(siteId: string, role: Role): Promise<Recipient[]>;
  /** an active member of the site, any role */
  member(siteId: string, userId: string): Promise<Recipient | null>;
  site(siteId: string): Promise<SiteFacts | null>;
  sites(): Promise<SiteFacts[]>;
  /** the round's site and when it was walked */
  round(roundId: string): Promise<{ siteId: string; at: Date } | null>;
  /** findings of the current analyses of rounds walked in [start, end) on the site */
  findings(siteId: string, start: Date, end: Date): Promise<DigestFinding[]>;
}

/**
 * The time a round was walked, on the server's clock: the device's start time plus the clock
 * skew its push measured (server receive time − the batch's sentAt).
 */
const ROUND_TIME_SQL = `(r."started_at_device" + r."client_clock_skew_ms" * interval '1 millisecond')`;

export function sqlNotifierSource(ds: DataSource): NotifierSource {
  const recipients = async (sql: string, params: unknown[]) =>
    ((await ds.query(sql, params)) as { user_id: string; email: string; name: string }[]).map((r) => ({
      userId: r.user_id,
      email: r.email,
      name: r.name,
    }));
  return {
    async workOrder(id) {
      const rows = (await ds.query(
        `SELECT w."id", w."site_id", s."name" AS site_name, w."code", w."title", w."kind", w."status", w."priority",
                w."instrument_tag", w."equipment_ref", w."reopen_count"
           FROM "work_orders" w JOIN "sites" s ON s."id" = w."site_id" WHERE w."id" = $1`,
        [id],
      )) as Record<string, unknown>[];
      const r = rows[0];
      if (!r) return null;
      return {
        id: String(r.id),
        siteId: String(r.site_id),
        siteName: String(r.site_name),
        code: String(r.code),
        title: String(r.title),
        kind: String(r.kind),
        status: String(r.status),
        priority: Number(r.priority),
        instrumentTag: (r.instrument_tag as string | null) ?? null,
        equipmentRef: (r.equipment_ref as string | null) ?? null,
        reopenCount: Number(r.reopen_count ?? 0),
      };
    },
    members: (siteId, role) =>
      recipients(
        `SELECT u."id" AS user_id, u."email", u."name" FROM "memberships" m JOIN "users" u ON u."id" = m."user_id"
          WHERE m."site_id" = $1 AND m."role" = $2 AND NOT u."disabled" ORDER BY u."email"`,
        [siteId, role],
      ),
    member: async (siteId, userId) =>
      (
        await recipients(
          `SELECT u."id" AS user_id, u."email", u."name" FROM "memberships" m JOIN "users" u ON u."id" = m."user_id"
            WHERE m."site_id" = $1 AND m."user_id" = $2 AND NOT u."disabled"`,
          [siteId, userId],
        )
      )[0] ?? null,
    async site(siteId) {
      const rows = (await ds.query(`SELECT "id", "name", "timezone" FROM "sites" WHERE "id" = $1`, [
        siteId,
      ])) as SiteFacts[];
      return rows[0] ?? null;
    },
    sites: async () => (await ds.query(`SELECT "id", "name", "timezone" FROM "sites" ORDER BY "slug"`)) as SiteFacts[],
    async round(roundId) {
      const rows = (await ds.query(`SELECT r."site_id", ${ROUND_TIME_SQL} AS at FROM "rounds" r WHERE r."id" = $1`, [
        roundId,
      ])) as {
        site_id: string;
        at: Date;
      }[];
      return rows[0] ? { siteId: rows[0].site_id, at: new Date(rows[0].at) } : null;
    },
    async findings(siteId, start, end) {
      const rows = (await ds.query(
        `SELECT f."round_id", rt."name" AS route_name, ${ROUND_TIME_SQL} AS at, f."kind", f."severity", f."message", f."instrument_tags"
           FROM "findings" f
           JOIN "analyses" a ON a."id" = f."analysis_id" AND a."is_current"
           JOIN "rounds" r ON r."id" = f."round_id"
           JOIN "route_versions" v ON v."id" = r."route_version_id"
           JOIN "routes" rt ON rt."id" = v."route_id"
          WHERE f."site_id" = $1 AND ${ROUND_TIME_SQL} >= $2 AND ${ROUND_TIME_SQL} < $3
          ORDER BY f."severity", at, f."ordinal"`,
        [siteId, start, end],
      )) as {
        round_id: string;
        route_name: string | null;
        at: Date;
        kind: string;
        severity: number;
        message: string;
        instrument_tags: unknown;
      }[];
      return rows.map((r) => ({
        roundId: r.round_id,
        routeName: r.route_name,
        at: new Date(r.at),
        kind: r.kind,
        severity: Number(r.severity),
        message: r.message,
        instrumentTags: Array.isArray(r.instrument_tags) ? r.instrument_tags.map(String) : [],
      }));
    },
  };
}

// ---------------------------------------------------------------------------------------------
// the words

const PRIORITY_WORDS: Record<number, string> = { 1: '1 (urgent)', 2: '2', 3: '3' };
const SEVERITY_WORDS: Record<number, string> = Object.fromEntries(
  Object.entries(LEVEL_LABELS).map(([k, v]) => [k, v.phrase]),
);

function workOrderLines(w: WorkOrderFacts, linkBase: string): string[] {
  return [
    `Work order: ${w.code}`,
    `Title: ${w.title}`,
    `Instrument: ${w.instrumentTag ?? (w.equipmentRef ? `none (equipment ${w.equipmentRef})` : 'none')}`,
    `Priority: ${PRIORITY_WORDS[w.priority] ?? String(w.priority)}`,
    `Kind: ${w.kind}`,
    `Status: ${w.status}`,
    `Open it: ${linkBase}${workOrderPath(w.id)}`,
  ];
}

const footer = (why: string) => [
  '',
  HAZARD_CAUTION,
  '',
  `You get this e-mail because ${why}. Trueround informs; it does not operate the plant.`,
];

export function openedMessage(w: WorkOrderFacts, to: Recipient, linkBase = ''): OutgoingMail {
  const what = w.reopenCount > 0 ? 'reopened' : 'opened';
  return {
    to: to.email,
    subject: `${SUBJECT_PREFIX} Priority 1 work order ${w.code} ${what}: ${w.title}`,
    text: [
      `Hello ${to.name},`,
      '',
      `A priority-1 work order was ${what} on ${w.siteName} from the latest round analysis. Please triage it.`,
      '',
      ...workOrderLines(w, linkBase),
      ...footer(`you are a planner on ${w.siteName}`),
    ].join('\n'),
    dedupeKey: `wo-opened|${w.id}|${w.reopenCount}|${to.userId}`,
    siteId: w.siteId,
  };
}

export function assignedMessage(w: WorkOrderFacts, to: Recipient, linkBase = ''): OutgoingMail {
  return {
    to: to.email,
    subject: `${SUBJECT_PREFIX} Work order ${w.code} assigned to you: ${w.title}`,
    text: [
      `Hello ${to.name},`,
      '',
      `Work order ${w.code} on ${w.siteName} is now assigned to you.`,
      '',
      ...workOrderLines(w, linkBase),
      ...footer(`the work order was assigned to you on ${w.siteName}`),
    ].join('\n'),
    dedupeKey: null,
    siteId: w.siteId,
  };
}

const hhmm = (d: Date, timeZone: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(d);

export function digestMessage(
  site: SiteFacts,
  shift: ShiftWindow,
  findings: readonly DigestFinding[],
  to: Recipient,
): OutgoingMail {
  // the same finding on several rounds of the shift is listed once, with its count
  const groups = new Map<string, { f: DigestFinding; rounds: Set<string> }>();
  for (const f of findings) {
    const key = `${f.kind}|${[...f.instrumentTags].sort().join(',')}`;
    const g = groups.get(key);
    if (g) {
      g.rounds.add(f.roundId);
      if (f.severity < g.f.severity) g.f = f;
    } else groups.set(key, { f, rounds: new Set([f.roundId]) });
  }
  const list = [...groups.values()].sort((a, b) => a.f.severity - b.f.severity || a.f.at.getTime() - b.f.at.getTime());
  const lines = list.slice(0, DIGEST_MAX_ITEMS).map(({ f, rounds }) => {
    const where = `${f.routeName ?? 'round'}, ${hhmm(f.at, site.timezone)}${rounds.size > 1 ? `; on ${rounds.size} rounds` : ''}`;
    return `- [${SEVERITY_WORDS[f.severity] ?? f.severity}] ${f.message} (${where})`;
  });
  if (list.length > DIGEST_MAX_ITEMS)
    lines.push(`- … and ${list.length - DIGEST_MAX_ITEMS} more; see the rounds in Trueround.`);
  const window = `${hhmm(shift.start, site.timezone)}–${hhmm(shift.end, site.timezone)} ${site.timezone}`;
  const urgent = list.filter((g) => g.f.severity <= 1).length;
  return {
    to: to.email,
    subject: `${SUBJECT_PREFIX} ${site.name}: ${list.length} finding${list.length === 1 ? '' : 's'} from the ${shift.name} shift of ${shift.localDate}${urgent ? ` (${urgent} urgent)` : ''}`,
    text: [
      `Hello ${to.name},`,
      '',
      `The round analyses of the ${shift.name} shift of ${shift.localDate} (${window}) at ${site.name} found:`,
      '',
      ...lines,
      '',
      'Each finding is held against the cycle balances and the instruments’ uncertainties; open the round in Trueround for the evidence.',
      ...footer(`you are an engineer on ${site.name}`),
    ].join('\n'),
    dedupeKey: `digest|${site.id}|${shift.start.toISOString()}|${to.userId}`,
    siteId: site.id,
  };
}

// ---------------------------------------------------------------------------------------------

export interface MailNotifierOptions {
  dataSource: DataSource;
  logger?: Logger;
  /** default: sqlNotifierSource(dataSource) */
  source?: NotifierSource;
  /** put before the link path, e.g. "https://trueround.example"; default "" (the path alone) */
  linkBase?: string;
  now?: () => Date;
}

export interface MailNotifier extends Notifier {
  /** Queues the digest of the shift starting at shiftStart for the site's engineers; resolves with the messages queued (0: already sent, or no findings). */
  sendDigest(siteId: string, shiftStart: Date): Promise<number>;
  /** Queues the digest of the last closed shift of every site (idempotent). */
  digestClosedShifts(): Promise<number>;
}

export function makeMailNotifier(o: MailNotifierOptions): MailNotifier {
  const source = o.source ?? sqlNotifierSource(o.dataSource);
  const now = o.now ?? (() => new Date());
  const linkBase = (o.linkBase ?? '').replace(/\/+$/, '');

  const queue = async (messages: OutgoingMail[], what: string) => {
    const n = await enqueueMail(o.dataSource, messages);
    if (n) o.logger?.info({ notification: what, queued: n }, 'mail: notices queued');
    return n;
  };

  const digest = async (site: SiteFacts, shift: ShiftWindow): Promise<number> => {
    if (shift.end.getTime() > now().getTime()) return 0; // not closed yet
    const findings = await source.findings(site.id, shift.start, shift.end);
    if (findings.length === 0) return 0;
    const engineers = await source.members(site.id, 'engineer');
    return queue(
      engineers.map((e) => digestMessage(site, shift, findings, e)),
      'shift digest',
    );
  };

  const lastClosed = (site: SiteFacts) => previousShift(shiftAt(now(), site.timezone), site.timezone);

  return {
    async workOrderOpened(workOrderId) {
      const w = await source.workOrder(workOrderId);
      if (!w) throw new Error(`workOrderOpened: no work order ${workOrderId}`);
      if (w.priority !== 1) return;
      const planners = await source.members(w.siteId, 'planner');
      await queue(
        planners.map((p) => openedMessage(w, p, linkBase)),
        'work order opened',
      );
    },
    async assigned(workOrderId, userId) {
      const w = await source.workOrder(workOrderId);
      if (!w) throw new Error(`assigned: no work order ${workOrderId}`);
      const to = await source.member(w.siteId, userId);
      if (!to) throw new Error(`assigned: user ${userId} is not an active member of site ${w.siteId}`);
      await queue([assignedMessage(w, to, linkBase)], 'work order assigned');
    },
    async findingsStored(roundId) {
      const r = await source.round(roundId);
      if (!r) throw new Error(`findingsStored: no round ${roundId}`);
      const site = await source.site(r.siteId);
      if (!site) throw new Error(`findingsStored: no site ${r.siteId}`);
      const own = shiftAt(r.at, site.timezone);
      const last = lastClosed(site);
      await digest(site, own);
      if (last.start.getTime() !== own.start.getTime()) await digest(site, last);
    },
    async sendDigest(siteId, shiftStart) {
      const site = await source.site(siteId);
      if (!site) throw new Error(`sendDigest: no site ${siteId}`);
      return digest(site, shiftStartingAt(shiftStart, site.timezone));
    },
    async digestClosedShifts() {
      let n = 0;
      for (const site of await source.sites()) n += await digest(site, lastClosed(site));
      return n;
    },
  };
}
