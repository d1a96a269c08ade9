import { useQuery } from '@tanstack/react-query';
import { SiteResponse } from '@/shared/api/sites';
import { useSession } from '../session';

export const siteKeys = {
  all: ['sites'] as const,
  detail: (id: string) => ['sites', id] as const,
};

export function useSite(siteId: string | undefined) {
  const { request, status } = useSession();
  return useQuery<SiteResponse>({
    queryKey: siteKeys.detail(siteId ?? ''),
    enabled: status === 'signed-in' && !!siteId,
    queryFn: async () => SiteResponse.parse(await request(`/api/sites/${siteId}`)),
  });
}
