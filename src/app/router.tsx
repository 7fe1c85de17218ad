import { createBrowserRouter, redirect, type LoaderFunctionArgs } from 'react-router-dom';
import { RouteError } from '../components/errors/route-error';
import { AppShell } from '../components/layouts/app-shell';
import { meQueryOptions } from '../features/auth/api/get-me';
import { ApiError, signInPath } from '../lib/api-client';
import { queryClient } from '../lib/query-client';

async function requireSignIn({ request }: LoaderFunctionArgs) {
  try {
    return await queryClient.ensureQueryData(meQueryOptions());
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) {
      const url = new URL(request.url);
      throw redirect(signInPath(url.pathname + url.search));
    }
    throw error;
  }
}

export const router = createBrowserRouter([
  { path: '/sign-in', lazy: () => import('./routes/auth/sign-in'), errorElement: <RouteError /> },
  { path: '/unsubscribe', lazy: () => import('./routes/digests/unsubscribe'), errorElement: <RouteError /> },
  {
    path: '/',
    element: <AppShell />,
    loader: requireSignIn,
    errorElement: <RouteError />,
    children: [
      { index: true, lazy: () => import('./routes/portfolio/overview') },
      { path: 'categories/:slug', lazy: () => import('./routes/portfolio/category') },
      { path: 'categories/:slug/items/:sku', lazy: () => import('./routes/portfolio/item') },
      { path: 'categories/:slug/alerts', lazy: () => import('./routes/alerts/category-alerts') },
      { path: 'alerts', lazy: () => import('./routes/alerts/my-alerts') },
      { path: 'admin/webhooks', lazy: () => import('./routes/admin/webhooks') },
      { path: 'admin/landing', lazy: () => import('./routes/admin/landing') },
      { path: 'categories/:slug/calibrate', lazy: () => import('./routes/calibration/calibrate') },
      { path: 'calibrate', lazy: () => import('./routes/calibration/choose') },
      { path: 'schedules', lazy: () => import('./routes/schedules/schedules') },
      { path: 'jobs', lazy: () => import('./routes/jobs/jobs') },
      { path: 'admin/people', lazy: () => import('./routes/admin/people') },
      { path: 'admin/audit', lazy: () => import('./routes/admin/audit') },
      { path: 'admin/tokens', lazy: () => import('./routes/admin/tokens') },
      { path: 'imports', lazy: () => import('./routes/imports/imports') },
      { path: 'digests', lazy: () => import('./routes/digests/archive') },
      { path: 'my-digests', lazy: () => import('./routes/digests/my-digests') },
      { path: 'outbox', lazy: () => import('./routes/outbox/outbox') },
      { path: 'deliveries', lazy: () => import('./routes/outbox/deliveries') },
      { path: '*', lazy: () => import('./routes/misc/not-found') },
    ],
  },
]);
