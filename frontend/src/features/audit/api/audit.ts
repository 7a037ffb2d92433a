import { keepPreviousData, useQuery } from '@tanstack/react-query';
import type { AuditPage } from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

export interface AuditFilters {
  action: string;
  actor: string;
  target: string;
  from: string;
  to: string;
}

function params(filters: AuditFilters): Record<string, string> {
  return Object.fromEntries(Object.entries(filters).filter(([, v]) => v.trim() !== ''));
}

export function useAuditTrail(filters: AuditFilters, page: number, pageSize: number) {
  return useQuery({
    queryKey: ['audit', filters, page, pageSize],
    queryFn: async () =>
      (
        await apiClient.get<AuditPage>('/audit', {
          params: { ...params(filters), page, pageSize },
        })
      ).data,
    placeholderData: keepPreviousData,
  });
}

/** The trail as CSV, every line the filters match; saved through a temporary link. */
export async function downloadAuditCsv(filters: AuditFilters): Promise<void> {
  const { data } = await apiClient.get<Blob>('/audit', {
    params: params(filters),
    headers: { Accept: 'text/csv' },
    responseType: 'blob',
  });
  const url = URL.createObjectURL(data);
  const link = document.createElement('a');
  link.href = url;
  link.download = `kinpath-audit-${new Date().toISOString().slice(0, 10)}.csv`;
  document.body.append(link);
  link.click();
  link.remove();
  URL.revokeObjectURL(url);
}
