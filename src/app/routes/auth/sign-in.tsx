import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate, useSearchParams } from 'react-router-dom';
import { signInSchema, type SignInInput } from '../../../../shared/auth';
import markUrl from '../../../assets/ballast-mark.svg';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useSignIn } from '../../../features/auth/api/sign-in';

function safeNext(next: string | null): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/';
}

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const signIn = useSignIn();
  const {
    register,
    handleSubmit,
    formState: { errors },
  } = useForm<SignInInput>({
    resolver: zodResolver(signInSchema),
    defaultValues: { email: '', password: '' },
  });

  const onSubmit = handleSubmit((values) =>
    signIn.mutate(values, { onSuccess: () => navigate(safeNext(params.get('next')), { replace: true }) }),
  );

  return (
    <div className="grid min-h-screen place-items-center bg-ink-900 px-4">
      <div className="w-full max-w-sm rounded-xl bg-paper p-8 shadow-xl">
        <div className="mb-6 flex items-center gap-3">
          <img src={markUrl} alt="" className="h-10 w-10" />
          <div>
            <h1 className="text-xl font-extrabold text-ink-900">Sign in to Ballast</h1>
            <p className="text-sm text-ink-500">Rating rankings with the evidence behind them.</p>
          </div>
        </div>
        {params.get('ended') ? (
          <p role="status" className="mb-4 rounded-md bg-brass-100 px-3 py-2 text-sm text-ink-800">
            Your session has ended. Please sign in again.
          </p>
        ) : null}
        {signIn.error ? (
          <p role="alert" className="mb-4 rounded-md bg-coral-100 px-3 py-2 text-sm text-ink-900">
            {errorMessage(signIn.error)}
          </p>
        ) : null}
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <div>
            <label htmlFor="email" className="block text-sm font-semibold text-ink-800">
              E-mail
            </label>
            <input
              id="email"
              type="email"
              autoComplete="username"
              aria-invalid={errors.email ? true : undefined}
              aria-describedby={errors.email ? 'email-error' : undefined}
              className="mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2"
              {...register('email')}
            />
            {errors.email ? (
              <p id="email-error" className="mt-1 text-sm text-coral-500">
                {errors.email.message}
              </p>
            ) : null}
          </div>
          <div>
            <label htmlFor="password" className="block text-sm font-semibold text-ink-800">
              Password
            </label>
            <input
              id="password"
              type="password"
              autoComplete="current-password"
              aria-invalid={errors.password ? true : undefined}
              aria-describedby={errors.password ? 'password-error' : undefined}
              className="mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2"
              {...register('password')}
            />
            {errors.password ? (
              <p id="password-error" className="mt-1 text-sm text-coral-500">
                {errors.password.message}
              </p>
            ) : null}
          </div>
          <Button type="submit" className="w-full" disabled={signIn.isPending}>
            {signIn.isPending ? 'Signing in…' : 'Sign in'}
          </Button>
        </form>
      </div>
    </div>
  );
}
