import { useMutation } from '@tanstack/react-query';
import type { LoginRequest, LoginResponse } from '@kinpath/contracts';
import { apiClient, LOGIN_URL } from '../../../lib/api-client';

export function useLogin() {
  return useMutation({
    mutationFn: async (request: LoginRequest) => {
      const { data } = await apiClient.post<LoginResponse>(LOGIN_URL, request);
      return data;
    },
  });
}
