import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateUserRequest, CreateUserResponse, UserAccount } from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export const usersQueryKey = ['users'] as const;

export function useUsers() {
  return useQuery({
    queryKey: usersQueryKey,
    queryFn: async () => (await apiClient.get<UserAccount[]>('/users')).data,
  });
}

export function useCreateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: CreateUserRequest) =>
      (await apiClient.post<CreateUserResponse>('/users', request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}
