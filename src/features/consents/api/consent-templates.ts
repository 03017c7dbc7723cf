import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { CreateTemplateInput, UpdateTemplateInput } from '../../../../server/features/consents/templates.schemas';
import type { ConsentKind, ConsentTemplate, TemplateStatus } from '../types';

export interface TemplateFilters {
  kind?: ConsentKind;
  status?: TemplateStatus;
}

export const templateKeys = {
  all: ['consent-templates'] as const,
  lists: () => [...templateKeys.all, 'list'] as const,
  list: (f: TemplateFilters) => [...templateKeys.lists(), f] as const,
  details: () => [...templateKeys.all, 'detail'] as const,
  detail: (id: string) => [...templateKeys.details(), id] as const,
};

export const getTemplates = (f: TemplateFilters, signal?: AbortSignal) => api<ConsentTemplate[]>('/api/consent-templates', { query: { kind: f.kind, status: f.status }, signal });
export const getTemplate = (id: string, signal?: AbortSignal) => api<ConsentTemplate>(`/api/consent-templates/${id}`, { signal });

export const templateListQuery = (f: TemplateFilters) => queryOptions({ queryKey: templateKeys.list(f), queryFn: ({ signal }) => getTemplates(f, signal) });
export const templateQuery = (id: string) => queryOptions({ queryKey: templateKeys.detail(id), queryFn: ({ signal }) => getTemplate(id, signal) });

export const useTemplates = (f: TemplateFilters = {}) => useQuery(templateListQuery(f));
export const useTemplate = (id: string | null) => useQuery({ ...templateQuery(id ?? ''), enabled: Boolean(id) });

function useTemplateMutation<V>(fn: (v: V) => Promise<ConsentTemplate | void>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (t) => {
      if (t) qc.setQueryData(templateKeys.detail(t.id), t);
      return qc.invalidateQueries({ queryKey: templateKeys.lists() });
    },
  });
}

export const useCreateTemplate = () => useTemplateMutation((input: CreateTemplateInput) => api<ConsentTemplate>('/api/consent-templates', { method: 'POST', body: input }));
export const useUpdateTemplate = (id: string) =>
  useTemplateMutation((input: UpdateTemplateInput) => api<ConsentTemplate>(`/api/consent-templates/${id}`, { method: 'PATCH', body: input }));
export const useNewTemplateVersion = () => useTemplateMutation((id: string) => api<ConsentTemplate>(`/api/consent-templates/${id}/versions`, { method: 'POST' }));
export const usePublishTemplate = () => useTemplateMutation((id: string) => api<ConsentTemplate>(`/api/consent-templates/${id}/publish`, { method: 'POST' }));
export const useRetireTemplate = () => useTemplateMutation((id: string) => api<ConsentTemplate>(`/api/consent-templates/${id}/retire`, { method: 'POST' }));
export const useDeleteDraft = () => useTemplateMutation((id: string) => api<void>(`/api/consent-templates/${id}`, { method: 'DELETE' }));
