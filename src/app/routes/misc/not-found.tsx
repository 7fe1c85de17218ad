import { Link } from 'react-router-dom';

export function Component() {
  return (
    <div className="mx-auto max-w-xl py-16 text-center">
      <p className="font-mono text-sm text-brass-700">404</p>
      <h1 className="mt-2 text-2xl font-bold text-ink-900">There is no such page in Ballast</h1>
      <p className="mt-3 text-ink-500">The link may be old, or the page may have moved.</p>
      <Link to="/" className="mt-6 inline-block font-semibold text-ink-700 underline">
        Back to the overview
      </Link>
    </div>
  );
}
