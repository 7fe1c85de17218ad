import { Suspense } from 'react';
import { NavLink, Outlet, useNavigate, useNavigation } from 'react-router-dom';
import { roleLabels } from '../../../shared/auth';
import { navFor } from '../../app/navigation';
import { useMe } from '../../features/auth/api/get-me';
import { useSignOut } from '../../features/auth/api/sign-out';
import markUrl from '../../assets/ballast-mark.svg';
import { Loading } from '../ui/status';

export function AppShell() {
  const { data: me } = useMe();
  const navigation = useNavigation();
  const navigate = useNavigate();
  const signOut = useSignOut();
  if (!me) return <Loading label="Checking your session…" />;

  return (
    <div className="min-h-screen md:grid md:grid-cols-[15rem_1fr]">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-white focus:px-3 focus:py-2"
      >
        Skip to content
      </a>
      <aside className="bg-ink-900 text-ink-100 md:min-h-screen">
        <div className="flex items-center gap-2.5 px-5 py-5">
          <img src={markUrl} alt="" className="h-8 w-8" />
          <span className="text-lg font-extrabold tracking-tight text-paper">Ballast</span>
        </div>
        <nav aria-label="Main" className="px-3 pb-4">
          <ul className="flex flex-wrap gap-1 md:flex-col">
            {navFor(me.role).map((item) => (
              <li key={item.label}>
                <NavLink
                  to={item.to}
                  end={item.to === '/'}
                  className={({ isActive }) =>
                    `block rounded-md px-3 py-2 text-sm font-medium ${
                      isActive
                        ? 'bg-ink-700 text-paper shadow-[inset_3px_0_0_var(--color-brass-500)]'
                        : 'hover:bg-ink-800'
                    }`
                  }
                >
                  {item.label}
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
        <div className="border-t border-ink-800 px-5 py-4 text-sm">
          <p className="font-semibold text-paper">{me.name}</p>
          <p className="text-ink-300" data-testid="role-label">
            {roleLabels[me.role]}
          </p>
          <button
            type="button"
            className="mt-3 rounded-md px-2 py-1 font-semibold text-brass-300 hover:bg-ink-800"
            onClick={() => signOut.mutate(undefined, { onSettled: () => navigate('/sign-in') })}
          >
            Sign out
          </button>
        </div>
      </aside>
      <main
        id="main"
        className="min-w-0 px-5 py-6 md:px-10 md:py-8"
        aria-busy={navigation.state === 'loading'}
      >
        {navigation.state === 'loading' ? (
          <div className="fixed inset-x-0 top-0 h-0.5 animate-pulse bg-brass-500" aria-hidden />
        ) : null}
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
