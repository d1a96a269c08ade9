import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/api/auth';
import type { SiteMember, SiteResponse } from '../../shared/api/sites';
import { MembershipEntity, SiteEntity } from '../entities';
import { AppError } from '../errors';

export async function getSite(ds: DataSource, siteId: string, callerRole: Role): Promise<SiteResponse> {
  const site = await ds.getRepository(SiteEntity).findOne({ where: { id: siteId } });
  if (!site) throw new AppError(404, 'not_found', 'Site not found');
  return {
    id: site.id,
    name: site.name,
    slug: site.slug,
    timezone: site.timezone,
    elevationM: site.elevationM,
    role: callerRole,
  };
}

export async function listMembers(ds: DataSource, siteId: string): Promise<SiteMember[]> {
  const rows = await ds.getRepository(MembershipEntity).find({
    where: { siteId },
    relations: { user: true },
  });
  return rows
    .map((m) => ({
      userId: m.userId,
      // the name this site's admin gave at the invitation; the account's own name where none was given
      name: m.displayName ?? m.user!.name,
      email: m.user!.email,
      role: m.role,
      disabled: m.user!.disabled,
    }))
    .sort((a, b) => a.name.localeCompare(b.name));
}
