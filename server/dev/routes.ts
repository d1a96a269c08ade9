/**
 * Development tools, mounted at /api/dev.
 *
 *   GET /api/dev/mailbox?siteId=…&limit=50  → { messages: MailboxMessage[] }, newest first
 *
 * What the local SMTP fake (server/mail/fake-smtp.ts) received about one site: the messages whose
 * outbox row (named by their Message-ID) was about that site. Only when the fake is in use
 * (SMTP_FAKE_PORT set, or createApp's `devMailbox`); otherwise 404, as if the route did not
 * exist. For the site's admins: another member gets 403, someone not on the site the same 404 as
 * an unknown site. Mail about no site (an account's lock notice) is in no site's mailbox.
 */
import { Router } from 'express';
import { z } from 'zod';
import type { MailboxMessage, MailboxResponse } from '../../shared/api/admin';
import { requireAuth, authOf } from '../auth/middleware';
import { deps } from '../context';
import { AppError, validationError } from '../errors';

export type { MailboxMessage, MailboxResponse };

const Query = z.object({
  siteId: z.uuid({ error: (iss) => (iss.input === undefined ? 'Required' : 'Must be a site UUID') }),
  limit: z
    .string()
    .regex(/^\d{1,4}$/, 'Must be a whole number from 1 to 500')
    .transform(Number)
    .pipe(z.number().min(1, 'Must be a whole number from 1 to 500').max(500, 'Must be a whole number from 1 to 500'))
    .default(50),
});

export function devRouter(mailboxEnabled: boolean): Router {
  const r = Router();
  r.get(
    '/mailbox',
    (req, _res, next) => {
      if (!mailboxEnabled)
        throw new AppError(
          404,
          'not_found',
          `Nothing at ${req.method} ${req.baseUrl}${req.path}: no mail fake runs on this server`,
        );
      next();
    },
    requireAuth,
    async (req, res) => {
      const { dataSource } = deps(req);
      const q = Query.safeParse(req.query);
      if (!q.success) throw validationError(q.error, 'query');
      const [m] = (await dataSource.query(`SELECT "role" FROM "memberships" WHERE "user_id" = $1 AND "site_id" = $2`, [
        authOf(req).userId,
        q.data.siteId,
      ])) as {
        role: string;
      }[];
      if (!m) throw new AppError(404, 'not_found', 'Site not found');
      if (m.role !== 'admin')
        throw new AppError(403, 'forbidden', `The dev mailbox is for the site's admins; you are ${m.role}`);
      const rows = (await dataSource.query(
        `SELECT "id", "received_at", "from_address", "to_addresses", "subject", "text", "raw_size"
           FROM "mail_messages" WHERE "site_id" = $1 ORDER BY "received_at" DESC, "id" DESC LIMIT $2`,
        [q.data.siteId, q.data.limit],
      )) as {
        id: string;
        received_at: Date;
        from_address: string;
        to_addresses: string[];
        subject: string;
        text: string;
        raw_size: number;
      }[];
      const body: MailboxResponse = {
        messages: rows.map((m) => ({
          id: m.id,
          receivedAt: new Date(m.received_at).toISOString(),
          from: m.from_address,
          to: m.to_addresses,
          subject: m.subject,
          text: m.text,
          rawSize: m.raw_size,
        })),
      };
      res.json(body);
    },
  );
  return r;
}
