import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Me, SignInInput } from '../../../../shared/auth';
import { api, rememberCsrfToken, rememberSession } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export async function signIn(input: SignInInput): Promise<Me> {
  const { csrfToken, ...me } = await api<Me & { csrfToken?: string }>('/api/auth/sign-in', {
    method: 'POST',
    body: input,
    redirectOn401: false,
  });
  rememberCsrfToken(csrfToken);
  rememberSession(true);
  return me;
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: (me) => {
      queryClient.clear();
      queryClient.setQueryData(queryKeys.me, me);
    },
  });
}
