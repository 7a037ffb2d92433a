import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import {
  compareTerms,
  type AdvisingNote,
  type CreateNoteRequest,
  type ElectiveExplanation,
  type ElectivesResponse,
  type HistoryEntry,
  type RecentStudent,
  type SentSummary,
  type Shortlist,
  type StudentHeader,
  type StudentLookupRequest,
  type StudentLookupResponse,
  type SummaryRequest,
  type SummaryResponse,
  type TermsResponse,
  type UpdateShortlistRequest,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';

/** Refs are opaque to the client; encode them anyway so no character can reshape the path. */
const studentPath = (ref: string) => `/students/${encodeURIComponent(ref)}`;

export const advisingKeys = {
  recent: ['students', 'recent'] as const,
  student: (ref: string) => ['students', ref] as const,
  history: (ref: string) => ['students', ref, 'history'] as const,
  electives: (ref: string, term: string | null) => ['students', ref, 'electives', term] as const,
  explanation: (ref: string, courseCode: string) =>
    ['students', ref, 'explanation', courseCode] as const,
  notes: (ref: string) => ['students', ref, 'notes'] as const,
  shortlist: (ref: string) => ['students', ref, 'shortlist'] as const,
  summaries: (ref: string) => ['students', ref, 'summaries'] as const,
};

/** The student number travels only in this POST body: never in a URL, a query key or history. */
export function useStudentLookup() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: StudentLookupRequest) =>
      (await apiClient.post<StudentLookupResponse>('/students/lookup', request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: advisingKeys.recent }),
  });
}

export function useRecentStudents() {
  return useQuery({
    queryKey: advisingKeys.recent,
    queryFn: async () => (await apiClient.get<RecentStudent[]>('/students/recent')).data,
  });
}

export function useStudent(ref: string) {
  return useQuery({
    queryKey: advisingKeys.student(ref),
    queryFn: async () => (await apiClient.get<StudentHeader>(studentPath(ref))).data,
  });
}

export function useHistory(ref: string) {
  return useQuery({
    queryKey: advisingKeys.history(ref),
    queryFn: async () => (await apiClient.get<HistoryEntry[]>(`${studentPath(ref)}/history`)).data,
  });
}

/** `term` null asks for the server's default: the next term. */
export function useElectives(ref: string, term: string | null) {
  return useQuery({
    queryKey: advisingKeys.electives(ref, term),
    queryFn: async () =>
      (
        await apiClient.get<ElectivesResponse>(`${studentPath(ref)}/electives`, {
          params: term ? { term } : undefined,
        })
      ).data,
    // Keep the previous term's rows on screen while another term loads.
    placeholderData: (previous) => previous,
  });
}

/** An estimate depends on the records and the model, not on the term it is shown for. */
export function useExplanation(ref: string, courseCode: string | null) {
  return useQuery({
    queryKey: advisingKeys.explanation(ref, courseCode ?? ''),
    enabled: courseCode !== null,
    queryFn: async () =>
      (
        await apiClient.get<ElectiveExplanation>(
          `${studentPath(ref)}/electives/${encodeURIComponent(courseCode ?? '')}/explanation`,
        )
      ).data,
  });
}

export function useNotes(ref: string) {
  return useQuery({
    queryKey: advisingKeys.notes(ref),
    queryFn: async () => (await apiClient.get<AdvisingNote[]>(`${studentPath(ref)}/notes`)).data,
  });
}

export function useAddNote(ref: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: CreateNoteRequest) =>
      (await apiClient.post<AdvisingNote>(`${studentPath(ref)}/notes`, request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: advisingKeys.notes(ref) }),
  });
}

/** A note's author changes its text; the server refuses anyone else. */
export function useEditNote(ref: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ id, text }: { id: string; text: string }) =>
      (await apiClient.patch<AdvisingNote>(`${studentPath(ref)}/notes/${id}`, { text })).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: advisingKeys.notes(ref) }),
  });
}

export function useDeleteNote(ref: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (id: string) => {
      await apiClient.delete(`${studentPath(ref)}/notes/${id}`);
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: advisingKeys.notes(ref) }),
  });
}

/** Summaries e-mailed to the student, newest first. */
export function useSentSummaries(ref: string) {
  return useQuery({
    queryKey: advisingKeys.summaries(ref),
    queryFn: async () => (await apiClient.get<SentSummary[]>(`${studentPath(ref)}/summaries`)).data,
  });
}

/** Advisors' only: other roles (registrar staff) neither fetch nor see a shortlist. */
export function useShortlist(ref: string, enabled = true) {
  return useQuery({
    enabled,
    queryKey: advisingKeys.shortlist(ref),
    queryFn: async () => (await apiClient.get<Shortlist>(`${studentPath(ref)}/shortlist`)).data,
  });
}

export function useUpdateShortlist(ref: string) {
  const queryClient = useQueryClient();
  const key = advisingKeys.shortlist(ref);
  return useMutation({
    // One change at a time, in order: each PUT carries the whole list as the advisor sees it.
    scope: { id: `shortlist:${ref}` },
    mutationKey: key,
    mutationFn: async (request: UpdateShortlistRequest) =>
      (await apiClient.put<Shortlist>(`${studentPath(ref)}/shortlist`, request)).data,
    onMutate: async (request) => {
      await queryClient.cancelQueries({ queryKey: key });
      const previous = queryClient.getQueryData<Shortlist>(key);
      if (previous) {
        queryClient.setQueryData<Shortlist>(key, { ...previous, courseCodes: request.courseCodes });
      }
      return { previous };
    },
    onSuccess: (shortlist) => {
      // A later change still queued would be undone on screen by this older answer.
      if (queryClient.isMutating({ mutationKey: key }) <= 1)
        queryClient.setQueryData(key, shortlist);
    },
    // Another advisor may have changed it meanwhile: read it again after a refusal.
    onError: () => queryClient.invalidateQueries({ queryKey: key }),
  });
}

export function useSendSummary(ref: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: SummaryRequest) =>
      (await apiClient.post<SummaryResponse>(`${studentPath(ref)}/summary`, request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: advisingKeys.summaries(ref) }),
  });
}

/** The terms an advisor may pick for electives: those after the latest term data, with offerings. */
export function useOfferedTerms() {
  return useQuery({
    queryKey: ['terms'],
    queryFn: async () => (await apiClient.get<TermsResponse>('/terms')).data,
    select: (response) => {
      const { current } = response;
      return {
        next: response.next,
        offered: response.terms
          .filter((t) => t.offerings > 0 && (current === null || compareTerms(t.term, current) > 0))
          .map((t) => t.term),
      };
    },
  });
}
