/** The detectability map of the site's units: redundancy, minimal detectable bias and remedies per instrument. */
import { useQuery } from '@tanstack/react-query';
import { DetectabilityResponse } from '@/shared/api/detectability';
import { useSession } from '../session';

export const detectabilityKeys = {
  site: (siteId: string) => ['detectability', siteId] as const,
};

export function useDetectability() {
  const { request, status, membership } = useSession();
  const siteId = membership?.siteId ?? '';
  return useQuery<DetectabilityResponse>({
    queryKey: detectabilityKeys.site(siteId),
    enabled: status === 'signed-in' && !!siteId && (membership?.role === 'engineer' || membership?.role === 'admin'),
    staleTime: 5 * 60_000,
    queryFn: async () => DetectabilityResponse.parse(await request(`/api/sites/${siteId}/detectability`)),
  });
}
