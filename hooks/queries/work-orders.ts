/**
 * Work orders: the query-key factory, the list and detail queries, and one mutation per action
 * of the status flow. Every action updates the cached detail and the cached list pages at once
 * (optimistic), puts them back if the server refuses, and refetches after either way.
 */
import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import {
  EvidencePage,
  WORK_ORDER_PAGE_SIZE,
  WorkOrderDetail,
  WorkOrderListResponse,
  type AssignRequest,
  type CancelRequest,
  type CloseRequest,
  type CommentRequest,
  type MergeRequest,
  type ScheduleRequest,
  type StartRequest,
  type TriageRequest,
  type WorkOrderAction,
  type WorkOrderListFilters,
  type WorkOrderSummary,
} from '@/shared/api/work-orders';
import { useSession } from '../session';

/** The list's filters: the wire schema's parsed shape (shared/api/work-orders.ts), each optional. */
export type WorkOrderFilters = Partial<WorkOrderListFilters>;

export const workOrderKeys = {
  all: (siteId: string) => ['work-orders', siteId] as const,
  lists: (siteId: string) => ['work-orders', siteId, 'list'] as const,
  list: (siteId: string, f: WorkOrderFilters) => ['work-orders', siteId, 'list', f] as const,
  detail: (siteId: string, id: string) => ['work-orders', siteId, 'detail', id] as const,
};

/** The query string of a list request (only the filters that are set). */
export function workOrderQuery(f: WorkOrderFilters): string {
  const q = new URLSearchParams();
  if (f.status?.length) q.set('status', f.status.join(','));
  if (f.priority?.length) q.set('priority', f.priority.join(','));
  if (f.kind?.length) q.set('kind', f.kind.join(','));
  if (f.unitId) q.set('unitId', f.unitId);
  if (f.tag?.trim()) q.set('tag', f.tag.trim());
  if (f.q?.trim()) q.set('q', f.q.trim());
  if (f.sort) q.set('sort', f.sort);
  q.set('limit', String(f.limit ?? WORK_ORDER_PAGE_SIZE));
  q.set('offset', String(f.offset ?? 0));
  return q.toString();
}

export function useWorkOrders(filters: WorkOrderFilters) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<WorkOrderListResponse>({
    queryKey: workOrderKeys.list(siteId, filters),
    enabled: status === 'signed-in' && !!siteId,
    placeholderData: (prev) => prev,
    queryFn: async () =>
      WorkOrderListResponse.parse(await request(`/api/sites/${siteId}/work-orders?${workOrderQuery(filters)}`)),
  });
}

export function useWorkOrder(id: string | undefined) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<WorkOrderDetail>({
    queryKey: workOrderKeys.detail(siteId, id ?? ''),
    enabled: status === 'signed-in' && !!siteId && !!id,
    queryFn: async () => WorkOrderDetail.parse(await request(`/api/sites/${siteId}/work-orders/${id}`)),
  });
}

export interface ActionBodies {
  triage: TriageRequest;
  assign: AssignRequest & { assigneeName?: string };
  schedule: ScheduleRequest;
  start: StartRequest;
  close: CloseRequest;
  cancel: CancelRequest;
  merge: MergeRequest;
  comment: CommentRequest;
}

export type ActionVariables = { [A in WorkOrderAction]: { action: A; body: ActionBodies[A] } }[WorkOrderAction];

/** What the order looks like once the action is through, as far as the app can tell before the server answers. */
export function optimisticPatch(wo: WorkOrderSummary, v: ActionVariables): Partial<WorkOrderSummary> {
  switch (v.action) {
    case 'triage':
      return {
        status: wo.status === 'open' ? 'triaged' : wo.status,
        ...(v.body.priority !== undefined ? { priority: v.body.priority } : {}),
        ...(v.body.dueDate !== undefined ? { dueDate: v.body.dueDate } : {}),
      };
    case 'assign':
      return { assignee: { id: v.body.userId, name: v.body.assigneeName ?? 'Assigning…' } };
    case 'schedule':
      return {
        status: 'scheduled',
        scheduledFor: v.body.scheduledFor,
        ...(v.body.dueDate !== undefined ? { dueDate: v.body.dueDate } : {}),
      };
    case 'start':
      return { status: 'in-progress' };
    case 'close':
      return { status: 'done', closedAt: new Date().toISOString() };
    case 'cancel':
      return { status: 'cancelled', cancelReason: v.body.reason };
    case 'merge':
    case 'comment':
      return {};
  }
}

interface Snapshot {
  detail: WorkOrderDetail | undefined;
  lists: [readonly unknown[], WorkOrderListResponse | undefined][];
}

function applyEverywhere(
  qc: QueryClient,
  siteId: string,
  id: string,
  patch: Partial<WorkOrderSummary>,
  v: ActionVariables,
) {
  qc.setQueryData<WorkOrderDetail>(workOrderKeys.detail(siteId, id), (old) => {
    if (!old) return old;
    const events =
      v.action === 'comment'
        ? [
            ...old.events,
            {
              id: '00000000-0000-4000-8000-000000000000',
              at: new Date().toISOString(),
              actor: null,
              type: 'comment',
              fromStatus: null,
              toStatus: null,
              changes: {},
              comment: v.body.comment,
            },
          ]
        : old.events;
    return { ...old, ...patch, events };
  });
  qc.setQueriesData<WorkOrderListResponse>({ queryKey: workOrderKeys.lists(siteId) }, (old) =>
    old
      ? {
          ...old,
          items: old.items.map((w) =>
            w.id === id
              ? { ...w, ...patch }
              : v.action === 'merge' && v.body.duplicateIds.includes(w.id)
                ? { ...w, status: 'cancelled' }
                : w,
          ),
        }
      : old,
  );
}

/** One mutation for every action of a work order, optimistic with rollback. */
export function useWorkOrderAction(id: string) {
  const { request, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  const qc = useQueryClient();
  return useMutation<WorkOrderDetail, Error, ActionVariables, Snapshot>({
    mutationFn: async (v) => {
      const body =
        v.action === 'assign'
          ? { userId: v.body.userId, ...(v.body.comment ? { comment: v.body.comment } : {}) }
          : v.body;
      return WorkOrderDetail.parse(
        await request(`/api/sites/${siteId}/work-orders/${id}/${v.action}`, { method: 'POST', json: body }),
      );
    },
    onMutate: async (v) => {
      await qc.cancelQueries({ queryKey: workOrderKeys.all(siteId) });
      const snapshot: Snapshot = {
        detail: qc.getQueryData<WorkOrderDetail>(workOrderKeys.detail(siteId, id)),
        lists: qc.getQueriesData<WorkOrderListResponse>({ queryKey: workOrderKeys.lists(siteId) }),
      };
      const base = snapshot.detail ?? snapshot.lists.flatMap(([, d]) => d?.items ?? []).find((w) => w.id === id);
      if (base) applyEverywhere(qc, siteId, id, optimisticPatch(base, v), v);
      return snapshot;
    },
    onError: (_e, _v, snapshot) => {
      if (!snapshot) return;
      qc.setQueryData(workOrderKeys.detail(siteId, id), snapshot.detail);
      for (const [key, data] of snapshot.lists) qc.setQueryData(key, data);
    },
    onSuccess: (detail) => {
      qc.setQueryData(workOrderKeys.detail(siteId, id), detail);
    },
    onSettled: () => {
      void qc.invalidateQueries({ queryKey: workOrderKeys.all(siteId) });
      void qc.invalidateQueries({ queryKey: ['instruments', siteId] });
    },
  });
}

/** Rounds `offset`… of an order's evidence (newest round first); the detail already holds the first page. */
export function useWorkOrderEvidence(id: string, offset: number, limit: number) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<EvidencePage>({
    queryKey: [...workOrderKeys.detail(siteId, id), 'evidence', offset, limit],
    enabled: status === 'signed-in' && !!siteId && !!id,
    queryFn: async () =>
      EvidencePage.parse(
        await request(`/api/sites/${siteId}/work-orders/${id}/evidence?offset=${offset}&limit=${limit}`),
      ),
  });
}
