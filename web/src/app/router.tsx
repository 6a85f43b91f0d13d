import { lazy, Suspense, type ComponentType, type LazyExoticComponent } from 'react';
import { createBrowserRouter, Navigate, type RouteObject } from 'react-router-dom';
import { areas, type AreaId } from './navigation';
import { AppLayout } from './layouts/AppLayout';
import { RequireAuth, RequirePermission } from './guards';
import { AreaPlaceholder } from './routes/AreaPlaceholder';
import { NotFoundPage } from './routes/NotFoundPage';
import { RouteErrorPage } from './routes/RouteErrorPage';
import { Loading } from '../components/ui/Spinner';

/**
 * The page of each area that is built. Each loads on first visit (React.lazy), so the charts and
 * tables of one feature never weigh on the start of another. An area not listed shows its placeholder.
 */
const pages: Partial<Record<AreaId, LazyExoticComponent<ComponentType>>> = {
  overview: lazy(() => import('../features/overview/routes/OverviewPage')),
  charts: lazy(() => import('../features/charts/routes/ChartsArea')),
  users: lazy(() => import('../features/users/routes/UsersPage')),
  results: lazy(() => import('../features/results/routes/ResultsArea')),
  methods: lazy(() => import('../features/test-methods/routes/TestMethodsArea')),
  records: lazy(() => import('../features/records/routes/RecordsArea')),
  alarms: lazy(() => import('../features/alarms/routes/AlarmsArea')),
  ncrs: lazy(() => import('../features/ncrs/routes/NcrsArea')),
  runs: lazy(() => import('../features/spc-runs/routes/RunsPage')),
  subscriptions: lazy(() => import('../features/subscriptions/routes/SubscriptionsPage')),
  outbox: lazy(() => import('../features/outbox/routes/OutboxPage')),
  'mail-log': lazy(() => import('../features/outbox/routes/MailLogPage')),
  'audit-trail': lazy(() => import('../features/audit-trail/routes/AuditTrailPage')),
  catalogue: lazy(() => import('../features/catalogue/routes/CatalogueArea')),
  plant: lazy(() => import('../features/catalogue/routes/PlantSettingsPage')),
  reports: lazy(() => import('../features/reports/routes/ReportsPage')),
};

/** Areas whose page routes further pages below its address itself (/charts/12, /results/history, /test-methods/RC). */
const withSubPages: ReadonlySet<AreaId> = new Set(['charts', 'results', 'methods', 'records', 'catalogue', 'alarms', 'ncrs']);

// Its form library and schemas are not needed by someone already signed in.
const SignInPage = lazy(() => import('../features/auth/routes/SignInPage'));

const areaRoutes: RouteObject[] = areas.map((area) => {
  const Page = pages[area.id];
  return {
    path: withSubPages.has(area.id) ? `${area.path}/*` : area.path,
    element: <RequirePermission action={area.permission}>{Page ? <Page /> : <AreaPlaceholder area={area} />}</RequirePermission>,
  };
});

export const routes: RouteObject[] = [
  {
    path: '/sign-in',
    element: (
      <Suspense fallback={<Loading className="justify-center py-24" />}>
        <SignInPage />
      </Suspense>
    ),
    errorElement: <RouteErrorPage />,
  },
  {
    element: (
      <RequireAuth>
        <AppLayout />
      </RequireAuth>
    ),
    errorElement: <RouteErrorPage />,
    children: [
      {
        errorElement: <RouteErrorPage />,
        children: [...areaRoutes, { path: '/admin', element: <Navigate to="/admin/users" replace /> }, { path: '*', element: <NotFoundPage /> }],
      },
    ],
  },
];

export const router = createBrowserRouter(routes);
