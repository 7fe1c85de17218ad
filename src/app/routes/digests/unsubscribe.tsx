import { useSearchParams } from 'react-router-dom';
import { Button } from '../../../components/ui/button';
import { ErrorPanel, Loading } from '../../../components/ui/status';
import { useUnsubscribeInfo } from '../../../features/subscriptions/api/get-unsubscribe';
import { usePostUnsubscribe } from '../../../features/subscriptions/api/post-unsubscribe';

/** Reached from the link in a digest mail, without signing in. A click confirms, so link scanners change nothing. */
export function Component() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const info = useUnsubscribeInfo(token);
  const post = usePostUnsubscribe();
  return (
    <main className="mx-auto mt-16 max-w-lg rounded-lg border border-ink-100 bg-white p-8 text-ink-900">
      <p className="text-xs font-extrabold tracking-widest text-brass-700">BALLAST</p>
      <h1 className="mt-2 text-2xl font-bold">Stop a digest</h1>
      {info.isPending ? <Loading /> : null}
      {info.isError ? <ErrorPanel error={info.error} /> : null}
      {post.data ? (
        <p role="status" className="mt-4 text-sm">
          {post.data.message}
        </p>
      ) : info.data?.used ? (
        <p role="status" className="mt-4 text-sm">
          This link was already used on {info.data.usedAt?.slice(0, 10)}: {info.data.email} no longer receives{' '}
          {info.data.label}. To receive it again, sign in and open My digests.
        </p>
      ) : info.data ? (
        <>
          <p className="mt-4 text-sm">
            {info.data.email} receives {info.data.label}. Stop sending it to this address?
          </p>
          {post.isError ? <ErrorPanel error={post.error} /> : null}
          <Button className="mt-4" disabled={post.isPending} onClick={() => post.mutate(token)}>
            Unsubscribe
          </Button>
        </>
      ) : null}
    </main>
  );
}
