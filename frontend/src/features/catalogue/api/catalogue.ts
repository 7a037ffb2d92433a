import { useQuery } from '@tanstack/react-query';
import type { CourseSummary, TermsResponse } from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

/** The whole catalogue; the page filters it in place, so changing a filter costs no request. */
export function useCourses() {
  return useQuery({
    queryKey: ['courses'],
    queryFn: async () => (await apiClient.get<CourseSummary[]>('/courses')).data,
  });
}

/** Shares its cache with the landing pages' term data summary (same key, same answer). */
export function useTerms() {
  return useQuery({
    queryKey: ['terms'],
    queryFn: async () => (await apiClient.get<TermsResponse>('/terms')).data,
  });
}
