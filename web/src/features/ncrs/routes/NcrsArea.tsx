import { lazy, Suspense } from 'react';
import { Route, Routes } from 'react-router-dom';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { RequirePermission } from '@web/app/guards';
import { Loading } from '@web/components/ui/Spinner';

const NcrListPage = lazy(() => import('./NcrListPage'));
const RaiseNcrPage = lazy(() => import('./RaiseNcrPage'));
const NcrPage = lazy(() => import('./NcrPage'));

/** /ncrs/*: everyone reads; raising asks for `ncr.raise`, and each page offers its changes only to the roles that may make them. */
export default function NcrsArea() {
  return (
    <Suspense fallback={<Loading />}>
      <Routes>
        <Route index element={<NcrListPage />} />
        <Route
          path="new"
          element={
            <RequirePermission action="ncr.raise">
              <RaiseNcrPage />
            </RequirePermission>
          }
        />
        <Route path=":id" element={<NcrPage />} />
        <Route path="*" element={<NotFoundPage />} />
      </Routes>
    </Suspense>
  );
}
