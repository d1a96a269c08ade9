/** Admin data and actions: the site's members, invitations, route versions, instrument changes and the dev mailbox (what the mail fake received). Wire schemas: shared/api/admin.ts. */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { InvitationResult, MailboxResponse, PublishVersionResponse, type InvitationRequest } from '@/shared/api/admin';
import { InstrumentUpdateResponse, type InstrumentUpdateRequest } from '@/shared/api/instruments';
import { instrumentKeys } from './instruments';
import { SiteMembersResponse } from '@/shared/api/sites';
import { useSession } from '../session';

export { MailboxResponse };

export const adminKeys = {
  members: (siteId: string) => ['admin', siteId, 'members'] as const,
  assignees: (siteId: string) => ['sites', siteId, 'assignees'] as const,
  mailbox: (siteId: string) => ['admin', siteId, 'mailbox'] as const,
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

/** The mail about the admin's current site (GET /api/dev/mailbox?siteId=: the server gives no other site's). */
export function useMailbox() {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<MailboxResponse>({
    queryKey: adminKeys.mailbox(siteId),
    enabled: status === 'signed-in' && !!siteId,
    retry: false,
    refetchInterval: 15_000,
    queryFn: async () =>
      MailboxResponse.parse(await request(`/api/dev/mailbox?siteId=${encodeURIComponent(siteId)}&limit=100`)),
  });
}

export type InvitationInput = InvitationRequest;

/** POST /api/sites/:siteId/invitations (server/admin): the person shows in the list at once, and leaves it if the server refuses. */
export function useInvite() {
  const { request, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  const qc = useQueryClient();
  return useMutation<InvitationResult, Error, InvitationInput, { before: SiteMembersResponse | undefined }>({
    mutationFn: async (body) =>
      InvitationResult.parse(await request(`/api/sites/${siteId}/invitations`, { method: 'POST', json: body })),
    onMutate: async (v) => {
      await qc.cancelQueries({ queryKey: adminKeys.members(siteId) });
      const before = qc.getQueryData<SiteMembersResponse>(adminKeys.members(siteId));
      if (before) {
        qc.setQueryData<SiteMembersResponse>(adminKeys.members(siteId), {
          members: [
            ...before.members,
            {
              userId: `pending-${v.email}`,
              name: v.name,
              email: v.email.trim().toLowerCase(),
              role: v.role,
              disabled: false,
            },
          ],
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

/** POST /api/sites/:siteId/routes/:routeId/versions: a 400 carries one detail per problem of the template (ApiError.details). */
export function usePublishVersion() {
  const { request, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  const qc = useQueryClient();
  return useMutation<PublishVersionResponse, Error, { routeId: string; template: unknown }>({
    mutationFn: async ({ routeId, template }) =>
      PublishVersionResponse.parse(
        await request(`/api/sites/${siteId}/routes/${routeId}/versions`, { method: 'POST', json: { template } }),
      ),
    onSuccess: () => void qc.invalidateQueries({ queryKey: instrumentKeys.reference(siteId) }),
  });
}

/** PATCH /api/sites/:siteId/instruments/:instrumentId; the site's reference data and health are read again after. */
export function useUpdateInstrument() {
  const { request, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  const qc = useQueryClient();
  return useMutation<InstrumentUpdateResponse, Error, { instrumentId: string; body: InstrumentUpdateRequest }>({
    mutationFn: async ({ instrumentId, body }) =>
      InstrumentUpdateResponse.parse(
        await request(`/api/sites/${siteId}/instruments/${instrumentId}`, { method: 'PATCH', json: body }),
      ),
    onSuccess: () => void qc.invalidateQueries({ queryKey: instrumentKeys.all(siteId) }),
  });
}
