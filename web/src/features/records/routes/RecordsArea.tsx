import { lazy, Suspense } from 'react';
import { Navigate, NavLink, Route, Routes } from 'react-router';
import { NotFoundPage } from '../../../app/routes/NotFoundPage';
import { Loading } from '../../../components/ui/Spinner';
import { cx } from '../../../components/ui/cx';

const SpecificationsPage = lazy(() => import('./SpecificationsPage'));
const SpecificationPage = lazy(() => import('./SpecificationPage'));
const ProcessEventsPage = lazy(() => import('./ProcessEventsPage'));

const tabs = [
  { to: '/records/specifications', label: 'Specifications' },
  { to: '/records/events', label: 'Process events' },
] as const;

/** /records/*: every role reads; the pages offer their forms only to the roles that may write. */
export default function RecordsArea() {
  return (
    <>
      <nav aria-label="Specification and event pages" className="mb-6 border-b border-zinc-200">
        <ul className="-mb-px flex flex-wrap gap-x-1">
          {tabs.map((tab) => (
            <li key={tab.to}>
              <NavLink
                to={tab.to}
                className={({ isActive }) =>
                  cx(
                    'block border-b-2 px-3 py-2 font-medium focus-visible:outline-2 focus-visible:outline-accent-600',
                    isActive ? 'border-accent-600 text-accent-800' : 'border-transparent text-zinc-600 hover:border-zinc-300 hover:text-zinc-900',
                  )
                }
              >
                {tab.label}
              </NavLink>
            </li>
          ))}
        </ul>
      </nav>
      <Suspense fallback={<Loading />}>
        <Routes>
          <Route index element={<Navigate to="/records/specifications" replace />} />
          <Route path="specifications" element={<SpecificationsPage />} />
          <Route path="specifications/:characteristicId" element={<SpecificationPage />} />
          <Route path="events" element={<ProcessEventsPage />} />
          <Route path="*" element={<NotFoundPage />} />
        </Routes>
      </Suspense>
    </>
  );
}
