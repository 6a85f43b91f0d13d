import { lazy, Suspense } from 'react';
import { Navigate, Route, Routes } from 'react-router-dom';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { Loading } from '@web/components/ui/Spinner';
import { AreaTabs } from '@web/components/ui/AreaTabs';

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
      <AreaTabs label="Specification and event pages" tabs={tabs} />
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
