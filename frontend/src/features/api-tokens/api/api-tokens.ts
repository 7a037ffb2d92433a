import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  API_TOKEN_OWNER_ROLES,
  type ApiTokenSummary,
  type CreateApiTokenRequest,
  type CreatedApiToken,
  type UserAccount,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export const apiTokensQueryKey = ['api-tokens'] as const;

export function useApiTokens() {
  return useQuery({
    queryKey: apiTokensQueryKey,
    queryFn: async () => (await apiClient.get<ApiTokenSummary[]>('/api-tokens')).data,
  });
}

/** Admins choose the owner: any active registrar or admin account. */
export function useTokenOwners(enabled: boolean) {
  return useQuery({
    queryKey: ['api-tokens', 'owners'],
    enabled,
    queryFn: async () =>
      (await apiClient.get<UserAccount[]>('/users')).data.filter(
        (user) => user.active && (API_TOKEN_OWNER_ROLES as readonly string[]).includes(user.role),
      ),
  });
}

export function useCreateApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: CreateApiTokenRequest) =>
      (await apiClient.post<CreatedApiToken>('/api-tokens', request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: apiTokensQueryKey }),
  });
}

export function useRevokeApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (id: string) =>
      (await apiClient.post<ApiTokenSummary>(`/api-tokens/${id}/revoke`)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: apiTokensQueryKey }),
  });
}
