import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  AddDepartmentRequest,
  CreateUserRequest,
  DepartmentEntry,
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

export const departmentsQueryKey = ['departments'] as const;

/** The departments a head may be scoped to: the catalogue's and those admins added. */
export function useDepartments() {
  return useQuery({
    queryKey: departmentsQueryKey,
    queryFn: async () => (await apiClient.get<DepartmentEntry[]>('/departments')).data,
  });
}

export function useAddDepartment() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: AddDepartmentRequest) =>
      (await apiClient.post<DepartmentEntry>('/departments', request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: departmentsQueryKey }),
  });
}

export function useRemoveDepartment() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (code: string) => {
      await apiClient.delete(`/departments/${encodeURIComponent(code)}`);
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: departmentsQueryKey }),
  });
}
