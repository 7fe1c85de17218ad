import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api, rememberCsrfToken, rememberSession } from '../../../lib/api-client';

export function signOut(): Promise<void> {
  return api<void>('/api/auth/sign-out', { method: 'POST' });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSettled: () => {
      rememberCsrfToken(undefined);
      rememberSession(false);
      queryClient.clear();
    },
  });
}
