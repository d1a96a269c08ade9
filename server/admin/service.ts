/**
 * Site administration use cases: inviting a person (a user with a one-time password and a
 * membership, told by e-mail through the mail outbox) and publishing a route version.
 */
import { randomBytes } from 'node:crypto';
import type { DataSource } from 'typeorm';
import type { InvitationResult } from '../../shared/api/admin';
import type { Role } from '../../shared/api/auth';
import { hashPassword } from '../auth/passwords';
import { AppError } from '../errors';
import { enqueueMail } from '../mail';
import { publishRouteVersion } from '../sync/route-versions';

export type { InvitationResult };

/** A one-time password of 16 characters from 96 random bits (base64url). */
export function oneTimePassword(): string {
  return randomBytes(12).toString('base64url');
}

export async function invite(
  ds: DataSource,
  siteId: string,
  input: { email: string; name: string; role: Role },
): Promise<InvitationResult> {
  const password = oneTimePassword();
  const hash = await hashPassword(password);
  const out = await ds.transaction(async (em) => {
    const [site] = (await em.query(`SELECT "name" FROM "sites" WHERE "id" = $1`, [siteId])) as { name: string }[];
    if (!site) throw new AppError(404, 'not_found', 'Site not found');
    const existing = (await em.query(`SELECT "id" FROM "users" WHERE "email" = $1 FOR UPDATE`, [input.email])) as {
      id: string;
    }[];
    let userId: string;
    let created = false;
    if (existing[0]) {
      userId = existing[0].id;
      const member = (await em.query(`SELECT "role" FROM "memberships" WHERE "user_id" = $1 AND "site_id" = $2`, [
        userId,
        siteId,
      ])) as { role: Role }[];
      if (member[0])
        throw new AppError(409, 'conflict', `${input.email} is already a member of this site (as ${member[0].role})`);
    } else {
      const rows = (await em.query(
        `INSERT INTO "users" ("email", "name", "password_hash") VALUES ($1, $2, $3) RETURNING "id"`,
        [input.email, input.name, hash],
      )) as { id: string }[];
      userId = rows[0].id;
      created = true;
    }
    // The site knows the person by the name its admin typed (memberships.display_name), never by the
    // account's own name, which another site may have set: the invitation reveals nothing of it.
    await em.query(`INSERT INTO "memberships" ("user_id", "site_id", "role", "display_name") VALUES ($1, $2, $3, $4)`, [
      userId,
      siteId,
      input.role,
      input.name,
    ]);
    return { userId, created, siteName: site.name, name: input.name };
  });
  const text = out.created
    ? `Hello ${out.name},\n\nyou are invited to Trueround for ${out.siteName} as ${input.role}.\n\nSign in with ${input.email} and this one-time password:\n\n    ${password}\n\nChoose your own password after signing in.\n`
    : `Hello ${out.name},\n\nyou now have access to ${out.siteName} in Trueround as ${input.role}. Sign in with your usual password.\n`;
  const queued = await enqueueMail(ds, [
    {
      to: input.email,
      subject: `Trueround: your access to ${out.siteName}`,
      text,
      dedupeKey: `invite:${siteId}:${out.userId}`,
      siteId,
    },
  ]);
  // the same shape whether the address had an account or not: whether it has one elsewhere is another site's business
  return { userId: out.userId, email: input.email, name: out.name, role: input.role, mailQueued: queued > 0 };
}

export async function publishVersion(
  ds: DataSource,
  siteId: string,
  routeId: string,
  template: unknown,
  userId: string,
) {
  return ds.transaction(async (em) => {
    const [route] = (await em.query(`SELECT "site_id" FROM "routes" WHERE "id" = $1`, [routeId])) as {
      site_id: string;
    }[];
    if (!route || route.site_id !== siteId) throw new AppError(404, 'not_found', 'Route not found on this site');
    const v = await publishRouteVersion(em, routeId, template, userId);
    return { id: v.id, routeId: v.routeId, number: v.number, publishedAt: new Date(v.publishedAt).toISOString() };
  });
}
