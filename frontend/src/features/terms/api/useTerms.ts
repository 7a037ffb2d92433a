import { useQuery } from '@tanstack/react-query';
import type { TermsResponse } from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

/** What the landing pages say about the term data Kinpath holds. */
export interface TermDataSummary {
  /** Terms with imported records (term data), oldest first. */
  termsWithRecords: string[];
  /** The latest term with records; null before any term data is imported. */
  current: string | null;
  next: string | null;
}

export function summariseTerms(response: TermsResponse): TermDataSummary {
  return {
    termsWithRecords: response.terms.filter((t) => t.records > 0).map((t) => t.term),
    current: response.current,
    next: response.next,
  };
}

export function useTermData() {
  return useQuery({
    queryKey: ['terms'],
    queryFn: async () => (await apiClient.get<TermsResponse>('/terms')).data,
    select: summariseTerms,
  });
}
