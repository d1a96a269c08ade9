/** Wire schemas of site routes. Pure zod only. */
import { z } from 'zod';
import { Role } from './auth';

export const SiteResponse = z.object({
  id: z.uuid(),
  name: z.string(),
  slug: z.string(),
  /** IANA time zone name, e.g. "Europe/London". */
  timezone: z.string(),
  /** Site elevation above sea level, m (gives the standard-atmosphere barometric pressure). */
  elevationM: z.number(),
  /** The caller's role on this site. */
  role: Role,
});
export type SiteResponse = z.infer<typeof SiteResponse>;

export const SiteMember = z.object({
  userId: z.uuid(),
  name: z.string(),
  email: z.string(),
  role: Role,
  disabled: z.boolean(),
});
export type SiteMember = z.infer<typeof SiteMember>;

export const SiteMembersResponse = z.object({ members: z.array(SiteMember) });
export type SiteMembersResponse = z.infer<typeof SiteMembersResponse>;
