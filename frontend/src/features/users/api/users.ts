import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  CreateUserRequest,
  CreateUserResponse,
  UpdateUserRequest,
  UserAccount,
} from '@kinpath/contracts';
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

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ id, ...change }: UpdateUserRequest & { id: string }) =>
      (await apiClient.patch<UserAccount>(`/users/${id}`, change)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}

export function useResendInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (id: string) =>
      (await apiClient.post<{ expiresAt: string }>(`/users/${id}/invitation`)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}

export function useRevokeInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (id: string) => {
      await apiClient.delete(`/users/${id}/invitation`);
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}
