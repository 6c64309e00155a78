// Invitations: read one by its token and accept it by setting a password (no sign-in needed).
import { useMutation, useQuery } from '@tanstack/react-query';
import { ApiError, api } from './client';
import type { InvitationInfo } from './types';

export const invitationKeys = {
  one: (token: string) => ['invitations', token] as const,
};

export function useInvitation(token: string) {
  return useQuery({
    queryKey: invitationKeys.one(token),
    queryFn: () => api<InvitationInfo>('GET', `/api/invitations/${encodeURIComponent(token)}`),
    retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
  });
}

export function useAcceptInvitation(token: string) {
  return useMutation({
    mutationFn: (input: { password: string }) =>
      api<unknown>('POST', `/api/invitations/${encodeURIComponent(token)}`, input),
  });
}
