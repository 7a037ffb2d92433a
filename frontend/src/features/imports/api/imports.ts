import { useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import type {
  ImportAccepted,
  ImportEncoding,
  ImportKind,
  ImportMapping,
  ImportPreview,
  ImportRejection,
  ImportSummary,
  SavedImportMapping,
  SaveImportMappingRequest,
} from '@kinpath/contracts';
import { apiClient } from '../../../lib/api-client';
import { awaitingModel, isRunning } from '../words';

export const importsQueryKey = ['imports'] as const;
const importQueryKey = (id: string) => ['imports', 'one', id] as const;
const rejectionsQueryKey = (id: string) => ['imports', 'rejections', id] as const;
const mappingsQueryKey = ['imports', 'mappings'] as const;

/** How often a running job is asked about, in milliseconds. */
export const POLL_INTERVAL_MS = 1000;

export function useImports() {
  return useQuery({
    queryKey: importsQueryKey,
    queryFn: async () => (await apiClient.get<ImportSummary[]>('/imports')).data,
  });
}

/** How often the page asks whether the estimates caught up after a commit or rollback. */
export const MODEL_POLL_INTERVAL_MS = 3000;

/**
 * One import; asked again every second while its job runs, then every few seconds until the
 * estimates have caught up with it, then left alone.
 */
export function useImport(id: string | null) {
  return useQuery({
    queryKey: importQueryKey(id ?? ''),
    queryFn: async () => (await apiClient.get<ImportSummary>(`/imports/${id}`)).data,
    enabled: id !== null,
    staleTime: 0,
    refetchInterval: (query) => {
      const summary = query.state.data;
      if (isRunning(summary?.status)) return POLL_INTERVAL_MS;
      return summary && awaitingModel(summary) ? MODEL_POLL_INTERVAL_MS : false;
    },
  });
}

export function useRejections(id: string, enabled: boolean) {
  return useQuery({
    queryKey: rejectionsQueryKey(id),
    queryFn: async () => (await apiClient.get<ImportRejection[]>(`/imports/${id}/errors`)).data,
    enabled,
  });
}

/** After a commit or rollback the catalogue, terms and grade points may all have changed. */
export function refreshAfterChange(queryClient: QueryClient) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: importsQueryKey }),
    queryClient.invalidateQueries({ queryKey: ['terms'] }),
    queryClient.invalidateQueries({ queryKey: ['courses'] }),
  ]);
}

export interface UploadRequest {
  file: File;
  kind: ImportKind;
  mapping: ImportMapping | null;
  commit: boolean;
  /** The encoding the registrar confirmed for a file that is not UTF-8. */
  encoding?: ImportEncoding | null;
  onProgress?: (fraction: number | null) => void;
}

export function useUpload() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ file, kind, mapping, commit, encoding, onProgress }: UploadRequest) => {
      const form = new FormData();
      // Text fields first: the server reads them before it streams the file to disk.
      form.append('kind', kind);
      if (mapping) form.append('mapping', JSON.stringify(mapping));
      if (commit) form.append('commit', 'true');
      if (encoding) form.append('encoding', encoding);
      form.append('file', file, file.name);
      const response = await apiClient.post<ImportAccepted>('/imports', form, {
        // A large file takes longer than the client's usual minute to send.
        timeout: 0,
        onUploadProgress: (event) =>
          onProgress?.(event.total ? Math.min(1, event.loaded / event.total) : null),
      });
      return response.data;
    },
    onSuccess: () => queryClient.invalidateQueries({ queryKey: importsQueryKey }),
  });
}

/** Enough of the file's start for its header and first rows; the server reads no more. */
export const PREVIEW_BYTES = 256 * 1024;

export function usePreview() {
  return useMutation({
    mutationFn: async ({ file, encoding }: { file: File; encoding?: ImportEncoding | null }) => {
      const form = new FormData();
      if (encoding) form.append('encoding', encoding);
      form.append('file', file.slice(0, PREVIEW_BYTES), file.name);
      return (await apiClient.post<ImportPreview>('/imports/preview', form)).data;
    },
  });
}

export function useSavedMappings() {
  return useQuery({
    queryKey: mappingsQueryKey,
    queryFn: async () => (await apiClient.get<SavedImportMapping[]>('/imports/mappings')).data,
  });
}

export function useSaveMapping() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (request: SaveImportMappingRequest) =>
      (await apiClient.post<SavedImportMapping>('/imports/mappings', request)).data,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: mappingsQueryKey }),
  });
}

function useImportAction(action: 'commit' | 'rollback' | 'discard') {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async (id: string) =>
      (await apiClient.post<ImportSummary>(`/imports/${id}/${action}`)).data,
    onSuccess: async (summary) => {
      queryClient.setQueryData(importQueryKey(summary.id), summary);
      await refreshAfterChange(queryClient);
    },
  });
}

export const useCommit = () => useImportAction('commit');
export const useRollback = () => useImportAction('rollback');
export const useDiscard = () => useImportAction('discard');

/** The kept file of a validated import, read again to choose another mapping. */
export function useKeptPreview(id: string, enabled: boolean) {
  return useQuery({
    queryKey: ['imports', 'kept-preview', id],
    queryFn: async () => (await apiClient.get<ImportPreview>(`/imports/${id}/preview`)).data,
    enabled,
    staleTime: Infinity,
  });
}

/** Checks the kept file again with another mapping; answers the new import. */
export function useCheckAgain() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ id, mapping }: { id: string; mapping: ImportMapping }) =>
      (
        await apiClient.post<ImportAccepted>(`/imports/${id}/check-again`, {
          mapping: JSON.stringify(mapping),
        })
      ).data,
    onSuccess: () => refreshAfterChange(queryClient),
  });
}

/** The report of rejected cells (line, column, value, reason) as CSV, saved by the browser. */
export async function downloadRejections(summary: ImportSummary): Promise<void> {
  const response = await apiClient.get<Blob>(`/imports/${summary.id}/errors`, {
    headers: { Accept: 'text/csv' },
    responseType: 'blob',
  });
  save(response.data, rejectionsFileName(summary.fileName));
}

/** The rejected rows themselves, in the file's own columns plus a reason, ready to fix. */
export async function downloadRejectedRows(summary: ImportSummary): Promise<void> {
  const response = await apiClient.get<Blob>(`/imports/${summary.id}/rejected-rows`, {
    responseType: 'blob',
  });
  save(response.data, rowsToFixFileName(summary.fileName));
}

function save(blob: Blob, name: string) {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.append(link);
  link.click();
  link.remove();
  // Revoked a little later: some browsers start the download after the click returns.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function rejectionsFileName(fileName: string): string {
  const base = fileName.replace(/\.[^.]*$/, '') || 'import';
  return `${base}-validation-report.csv`;
}

export function rowsToFixFileName(fileName: string): string {
  const base = fileName.replace(/\.[^.]*$/, '') || 'import';
  return `${base}-rows-to-fix.csv`;
}
