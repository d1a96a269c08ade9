/** The site's analysed rounds, newest first, a page at a time (GET /api/sites/:siteId/rounds?analysed=1). */
import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { AnalysedRoundsResponse } from '@/shared/api/rounds';
import { useSession } from '../session';

export const roundKeys = {
  analysed: (siteId: string, page: number, limit: number) => ['rounds', siteId, 'analysed', page, limit] as const,
};

export function useAnalysedRounds(page: number, limit = 25) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<AnalysedRoundsResponse>({
    queryKey: roundKeys.analysed(siteId, page, limit),
    enabled: status === 'signed-in' && !!siteId,
    placeholderData: keepPreviousData,
    queryFn: async () =>
      AnalysedRoundsResponse.parse(await request(`/api/sites/${siteId}/rounds?analysed=1&page=${page}&limit=${limit}`)),
  });
}
