import { keepPreviousData, useQuery } from '@tanstack/react-query';
import type {
  BacktestResponse,
  CourseForecast,
  ForecastAbout,
  OutlookRunSummary,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export interface OutlookFilter {
  department?: string;
  atRiskBelow?: number;
}

/** Query parameters without empty values. */
function params(filter: OutlookFilter) {
  return {
    ...(filter.department ? { department: filter.department } : {}),
    ...(filter.atRiskBelow !== undefined ? { atRiskBelow: filter.atRiskBelow } : {}),
  };
}

export function useOutlookAbout() {
  return useQuery({
    queryKey: ['forecasts', 'about'],
    queryFn: async () => (await apiClient.get<ForecastAbout>('/forecasts/about')).data,
    // While a run is being computed, look again now and then.
    refetchInterval: (query) => (query.state.data && !query.state.data.pending ? false : 5000),
  });
}

export function useForecasts(filter: OutlookFilter, enabled: boolean, runId: string | null) {
  return useQuery({
    queryKey: ['forecasts', 'list', filter, runId],
    queryFn: async () =>
      (await apiClient.get<CourseForecast[]>('/forecasts', { params: params(filter) })).data,
    enabled,
    placeholderData: keepPreviousData,
  });
}

export function useBacktest(
  department: string | undefined,
  term: string | undefined,
  enabled: boolean,
  runId: string | null,
) {
  return useQuery({
    queryKey: ['forecasts', 'backtest', department ?? null, term ?? null, runId],
    queryFn: async () =>
      (
        await apiClient.get<BacktestResponse>('/forecasts/backtest', {
          params: { ...(department ? { department } : {}), ...(term ? { term } : {}) },
        })
      ).data,
    enabled,
    placeholderData: keepPreviousData,
  });
}

export function useOutlookRuns(enabled: boolean) {
  return useQuery({
    queryKey: ['forecasts', 'runs'],
    queryFn: async () => (await apiClient.get<OutlookRunSummary[]>('/forecasts/runs')).data,
    enabled,
    refetchInterval: 5000,
  });
}

/** Fetches the CSV through the API client (it carries the token) and saves it as a file. */
export async function downloadOutlookCsv(
  filter: OutlookFilter,
  term: string | null,
): Promise<void> {
  const res = await apiClient.get<Blob>('/forecasts/export', {
    params: params(filter),
    responseType: 'blob',
    headers: { Accept: 'text/csv' },
  });
  const url = URL.createObjectURL(res.data);
  const link = document.createElement('a');
  link.href = url;
  link.download = `demand-outlook-${term ?? 'term'}${filter.department ? `-${filter.department}` : ''}.csv`;
  document.body.appendChild(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
