import { useQuery } from '@tanstack/react-query';
import { MeResponse } from '@/shared/api/auth';
import { useSession } from '../session';

export const meKeys = { all: ['me'] as const };

/** The signed-in user as the server knows them now. */
export function useMe() {
  const { request, status } = useSession();
  return useQuery<MeResponse>({
    queryKey: meKeys.all,
    enabled: status === 'signed-in',
    queryFn: async () => MeResponse.parse(await request('/api/me')),
  });
}
