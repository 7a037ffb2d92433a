import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  CreateEvaluationRequest,
  EvaluationAccepted,
  EvaluationDetail,
  EvaluationStatus,
  EvaluationSummary,
  ModelSettingsResponse,
  ModelSettingsVersion,
  UpdateModelSettingsRequest,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export const settingsQueryKey = ['model', 'settings'] as const;
export const versionsQueryKey = ['model', 'settings', 'versions'] as const;
export const evaluationsQueryKey = ['model', 'evaluations'] as const;
const evaluationQueryKey = (id: string) => ['model', 'evaluations', id] as const;

/** A backtest on a 2,000-student term history takes seconds; once a second is enough. */
const POLL_INTERVAL_MS = 1000;

export const isRunning = (status: EvaluationStatus | undefined) =>
  status === 'queued' || status === 'running';

export function useModelSettings() {
  return useQuery({
    queryKey: settingsQueryKey,
    queryFn: async () => (await apiClient.get<ModelSettingsResponse>('/model/settings')).data,
  });
}

export function useSettingsVersions() {
  return useQuery({
    queryKey: versionsQueryKey,
    queryFn: async () =>
      (await apiClient.get<ModelSettingsVersion[]>('/model/settings/versions')).data,
  });
}

/** After a save or a restore, the version in force and the history are read again. */
function useSettingsWrite<T>(write: (value: T) => Promise<ModelSettingsResponse>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: write,
    onSuccess: (saved) => {
      queryClient.setQueryData(settingsQueryKey, saved);
      void queryClient.invalidateQueries({ queryKey: versionsQueryKey });
    },
  });
}

export function useSaveSettings() {
  return useSettingsWrite(
    async (request: UpdateModelSettingsRequest) =>
      (await apiClient.put<ModelSettingsResponse>('/model/settings', request)).data,
  );
}

export function useRestoreVersion() {
  return useSettingsWrite(
    async (version: number) =>
      (await apiClient.post<ModelSettingsResponse>(`/model/settings/versions/${version}/restore`))
        .data,
  );
}

export function useEvaluations() {
  return useQuery({
    queryKey: evaluationsQueryKey,
    queryFn: async () => (await apiClient.get<EvaluationSummary[]>('/model/evaluations')).data,
  });
}

/** One backtest, polled while it is queued or running. */
export function useEvaluation(id: string | null) {
  const queryClient = useQueryClient();
  return useQuery({
    queryKey: evaluationQueryKey(id ?? ''),
    queryFn: async () => {
      const data = (await apiClient.get<EvaluationDetail>(`/model/evaluations/${id}`)).data;
      if (!isRunning(data.status))
        void queryClient.invalidateQueries({ queryKey: evaluationsQueryKey, exact: true });
      return data;
    },
    enabled: id !== null,
    staleTime: 0,
    refetchInterval: (query) => (isRunning(query.state.data?.status) ? POLL_INTERVAL_MS : false),
  });
}

export function useStartEvaluation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: CreateEvaluationRequest) =>
      (await apiClient.post<EvaluationAccepted>('/model/evaluations', request)).data,
    onSuccess: () =>
      void queryClient.invalidateQueries({ queryKey: evaluationsQueryKey, exact: true }),
  });
}
