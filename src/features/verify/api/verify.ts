import { queryOptions, useMutation, useQuery } from '@tanstack/react-query';
import type { SigningCertificate, VerifyAnswer } from '../../../../server/features/verify/verify.schemas';
import { api } from '../../../lib/api-client';

export type { SigningCertificate, VerifyAnswer };

export const verifyKeys = { all: ['verify'] as const, certificate: () => [...verifyKeys.all, 'certificate'] as const };

export function verifyPdf(file: File): Promise<VerifyAnswer> {
  const form = new FormData();
  form.append('pdf', file, file.name);
  return api<VerifyAnswer>('/api/verify/pdf', { method: 'POST', body: form });
}

export const verifyHash = (sha256: string) => api<VerifyAnswer>('/api/verify/hash', { method: 'POST', body: { sha256 } });

export const useVerify = () => useMutation({ mutationFn: (input: { file: File } | { sha256: string }) => ('file' in input ? verifyPdf(input.file) : verifyHash(input.sha256)) });

export const certificateQuery = () =>
  queryOptions({ queryKey: verifyKeys.certificate(), queryFn: ({ signal }) => api<SigningCertificate>('/api/verify/certificate', { signal }), staleTime: Infinity });

export const useSigningCertificate = () => useQuery(certificateQuery());
