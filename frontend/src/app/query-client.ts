import { QueryClient } from '@tanstack/react-query';
import { httpStatus } from '../lib/api-client';

export function createQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        refetchOnWindowFocus: false,
        // A 4xx answer will not change on retry; network hiccups and 5xx get two more tries.
        retry: (failures, error) => {
          const status = httpStatus(error);
          if (status !== undefined && status < 500) return false;
          return failures < 2;
        },
      },
      mutations: { retry: false },
    },
  });
}
