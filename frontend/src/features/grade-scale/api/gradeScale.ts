import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  GradeScale,
  UpdateGradeScaleRequest,
  UpdateGradeScaleResponse,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export const gradeScaleQueryKey = ['grade-scale'] as const;

export function useGradeScale() {
  return useQuery({
    queryKey: gradeScaleQueryKey,
    queryFn: async () => (await apiClient.get<GradeScale>('/grade-scale')).data,
  });
}

export function useSaveGradeScale() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: UpdateGradeScaleRequest) =>
      (await apiClient.put<UpdateGradeScaleResponse>('/grade-scale', request)).data,
    onSuccess: (saved) => {
      const { recordsUpdated: _recordsUpdated, ...scale } = saved;
      queryClient.setQueryData<GradeScale>(gradeScaleQueryKey, scale);
    },
  });
}
