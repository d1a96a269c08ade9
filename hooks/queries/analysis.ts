/** A round's analysis: state points, balances, performance figures, reconciliation and findings. */
import { useQuery } from '@tanstack/react-query';
import { RoundAnalysisResponse } from '@/shared/api/analysis';
import { useSession } from '../session';

export const analysisKeys = {
  all: (siteId: string) => ['analysis', siteId] as const,
  round: (siteId: string, roundId: string) => ['analysis', siteId, 'round', roundId] as const,
};

export function useRoundAnalysis(roundId: string | undefined) {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<RoundAnalysisResponse>({
    queryKey: analysisKeys.round(siteId, roundId ?? ''),
    enabled: status === 'signed-in' && !!siteId && !!roundId,
    queryFn: async () => RoundAnalysisResponse.parse(await request(`/api/sites/${siteId}/rounds/${roundId}/analysis`)),
  });
}
