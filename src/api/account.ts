// The signed-in user's own account.
import { useMutation } from '@tanstack/react-query';
import { api } from './client';

export function useChangePassword() {
  return useMutation({
    mutationFn: (input: { currentPassword: string; newPassword: string }) =>
      api<void>('PUT', '/api/account/password', input),
  });
}
