/** Admin data: the site's members and the dev mailbox (what the mail fake received). */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { Role } from '@/shared/api/auth';
import { SiteMembersResponse } from '@/shared/api/sites';
import { useSession } from '../session';

/** The dev mailbox's wire shape (server/dev/routes.ts MailboxResponse; no shared schema yet). */
export const MailboxResponse = z.object({
  messages: z.array(
    z.object({
      id: z.string(),
      receivedAt: z.iso.datetime(),
      from: z.string(),
      to: z.array(z.string()),
      subject: z.string(),
      text: z.string(),
      rawSize: z.number(),
    }),
  ),
});
export type MailboxResponse = z.infer<typeof MailboxResponse>;

export const adminKeys = {
  members: (siteId: string) => ['admin', siteId, 'members'] as const,
  assignees: (siteId: string) => ['sites', siteId, 'assignees'] as const,
  mailbox: () => ['admin', 'mailbox'] as const,
};

/** Members of the site (GET /api/sites/:siteId/members is for admins today). */
export function useMembers(enabled = true) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<SiteMembersResponse>({
    queryKey: adminKeys.members(siteId),
    enabled: enabled && status === 'signed-in' && !!siteId,
    retry: false,
    queryFn: async () => SiteMembersResponse.parse(await request(`/api/sites/${siteId}/members`)),
  });
}

/** The site's people a work order can go to (planners, engineers and admins may ask). */
export function useAssignees(enabled = true) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<SiteMembersResponse>({
    queryKey: adminKeys.assignees(siteId),
    enabled: enabled && status === 'signed-in' && !!siteId,
    retry: false,
    queryFn: async () => SiteMembersResponse.parse(await request(`/api/sites/${siteId}/assignees`)),
  });
}

export function useMailbox() {
  const { request, status } = useSession();
  return useQuery<MailboxResponse>({
    queryKey: adminKeys.mailbox(),
    enabled: status === 'signed-in',
    retry: false,
    refetchInterval: 15_000,
    queryFn: async () => MailboxResponse.parse(await request('/api/dev/mailbox?limit=100')),
  });
}

export interface InvitationInput {
  email: string;
  name: string;
  role: Role;
}

/** POST /api/sites/:siteId/invitations (server/admin): the person shows in the list at once, and leaves it if the server refuses. */
export function useInvite() {
  const { request, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  const qc = useQueryClient();
  return useMutation<unknown, Error, InvitationInput, { before: SiteMembersResponse | undefined }>({
    mutationFn: (body) => request(`/api/sites/${siteId}/invitations`, { method: 'POST', json: body }),
    onMutate: async (v) => {
      await qc.cancelQueries({ queryKey: adminKeys.members(siteId) });
      const before = qc.getQueryData<SiteMembersResponse>(adminKeys.members(siteId));
      if (before) {
        qc.setQueryData<SiteMembersResponse>(adminKeys.members(siteId), {
          members: [...before.members, { userId: `pending-${v.email}`, name: v.name, email: v.email.trim().toLowerCase(), role: v.role, disabled: false }],
        });
      }
      return { before };
    },
    onError: (_e, _v, ctx) => {
      if (ctx?.before) qc.setQueryData(adminKeys.members(siteId), ctx.before);
    },
    onSettled: () => void qc.invalidateQueries({ queryKey: adminKeys.members(siteId) }),
  });
}
