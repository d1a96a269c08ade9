/** Instrument health, one instrument's history, and the site's reference data (units and their cycle models, instruments as configured). */
import { useQuery } from '@tanstack/react-query';
import { InstrumentHistoryResponse, InstrumentListResponse } from '@/shared/api/analysis';
import { PullResponse } from '@/shared/api/sync';
import { useSession } from '../session';

export const instrumentKeys = {
  all: (siteId: string) => ['instruments', siteId] as const,
  health: (siteId: string) => ['instruments', siteId, 'health'] as const,
  history: (siteId: string, tag: string, from: string) => ['instruments', siteId, 'history', tag, from] as const,
  reference: (siteId: string) => ['instruments', siteId, 'reference'] as const,
};

export function useInstrumentHealth() {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<InstrumentListResponse>({
    queryKey: instrumentKeys.health(siteId),
    enabled: status === 'signed-in' && !!siteId,
    queryFn: async () => InstrumentListResponse.parse(await request(`/api/sites/${siteId}/instruments`)),
  });
}

/** `from`: YYYY-MM-DD. */
export function useInstrumentHistory(tag: string | undefined, from: string) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<InstrumentHistoryResponse>({
    queryKey: instrumentKeys.history(siteId, tag ?? '', from),
    enabled: status === 'signed-in' && !!siteId && !!tag,
    queryFn: async () =>
      InstrumentHistoryResponse.parse(
        await request(`/api/sites/${siteId}/instruments/${encodeURIComponent(tag ?? '')}/history?from=${from}`),
      ),
  });
}

/** The whole reference data of the site (a pull from cursor 0): units with their models, instruments with range, accuracy and calibration. */
export function useSiteReference() {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<PullResponse>({
    queryKey: instrumentKeys.reference(siteId),
    enabled: status === 'signed-in' && !!siteId,
    staleTime: 5 * 60_000,
    queryFn: async () => PullResponse.parse(await request(`/api/sync/pull?siteId=${siteId}&cursor=0`)),
  });
}
