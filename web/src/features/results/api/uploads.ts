import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { ColumnMapping, CsvDialect, SaveMappingInput } from '@shared/ingest';
import type { UploadImported, UploadListItem, UploadStatus, UploadVoided } from '@shared/schemas/uploads';
import { fileOutcome, type UploadOutcome } from '@web/lib/import-outcome';
import { lotKeys } from '@web/lib/lots';

export interface SavedMapping {
  id: number;
  name: string;
  mapping: ColumnMapping;
  createdAt: string;
  createdByName: string | null;
}

export const uploadLinks = {
  template: '/api/v1/uploads/template.csv',
  errorReport: (id: number) => `/api/v1/uploads/${id}/errors.csv`,
  file: (id: number) => `/api/v1/uploads/${id}/file`,
};

export const uploadKeys = {
  all: ['uploads'] as const,
  list: (status?: UploadStatus) => [...uploadKeys.all, 'list', status ?? 'any'] as const,
  mappings: ['column-mappings'] as const,
};

export async function fetchUploads(status: UploadStatus | undefined, signal?: AbortSignal): Promise<UploadListItem[]> {
  const query = new URLSearchParams({ limit: '200', ...(status ? { status } : {}) });
  const { items } = await http<{ items: UploadListItem[] }>(`/api/v1/uploads?${query}`, { signal });
  return items;
}

export const uploadsQueryOptions = (status?: UploadStatus) =>
  queryOptions({
    queryKey: uploadKeys.list(status),
    queryFn: ({ signal }) => fetchUploads(status, signal),
  });

export function useUploads(status?: UploadStatus) {
  return useQuery(uploadsQueryOptions(status));
}

export interface UploadInput {
  file: File;
  /** Left out for a file in the canonical long layout. */
  mapping?: ColumnMapping;
  /** The delimiter and decimal mark the preview showed, so the server reads the file as the person saw it. */
  dialect: CsvDialect;
}

/** POST /api/v1/uploads. A 422 or 409 is an answer about the file, not a failure of the request. */
export async function uploadResults({ file, mapping, dialect }: UploadInput): Promise<UploadOutcome> {
  const form = new FormData();
  form.append('file', file, file.name);
  form.append('delimiter', dialect.delimiter);
  form.append('decimalComma', String(dialect.decimalComma));
  if (mapping) form.append('mapping', JSON.stringify(mapping));
  try {
    const created = await http<UploadImported>('/api/v1/uploads', { method: 'POST', body: form });
    return { kind: 'imported', ...created };
  } catch (error) {
    const outcome = fileOutcome(error);
    if (outcome) return outcome;
    throw error;
  }
}

export function useUploadResults() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: uploadResults,
    // A rejected file is kept as evidence too, so the history changes whatever the outcome.
    onSettled: () => queryClient.invalidateQueries({ queryKey: uploadKeys.all }),
  });
}

export function voidUpload({ id, reason }: { id: number; reason: string }) {
  return http<UploadVoided>(`/api/v1/uploads/${id}/void`, { method: 'POST', body: { reason } });
}

export function useVoidUpload() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: voidUpload,
    // The lots of the upload lose its results.
    onSuccess: () => Promise.all([queryClient.invalidateQueries({ queryKey: uploadKeys.all }), queryClient.invalidateQueries({ queryKey: lotKeys.all })]),
  });
}

export const columnMappingsQueryOptions = () =>
  queryOptions({
    queryKey: uploadKeys.mappings,
    queryFn: async ({ signal }) => (await http<{ items: SavedMapping[] }>('/api/v1/column-mappings', { signal })).items,
  });

export function useColumnMappings() {
  return useQuery(columnMappingsQueryOptions());
}

export function useSaveColumnMapping() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SaveMappingInput) => http<SavedMapping>('/api/v1/column-mappings', { method: 'POST', body: input }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: uploadKeys.mappings }),
  });
}
