import { lazy, Suspense } from 'react';
import { Navigate, Route, Routes } from 'react-router-dom';
import { RequirePermission } from '@web/app/guards';
import { useSignedInUser } from '@web/lib/session';
import { may, type Permission } from '@shared/permissions';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { Loading } from '@web/components/ui/Spinner';
import { AreaTabs } from '@web/components/ui/AreaTabs';

const UploadPage = lazy(() => import('./UploadPage'));
const ManualEntryPage = lazy(() => import('./ManualEntryPage'));
const UploadHistoryPage = lazy(() => import('./UploadHistoryPage'));
const LotPage = lazy(() => import('./LotPage'));
const LotListPage = lazy(() => import('./LotListPage'));

const tabs = [
  { to: '/results/upload', label: 'Upload a file', permission: 'upload.create' },
  { to: '/results/enter', label: 'Enter a lot by hand', permission: 'measurement.create' },
  { to: '/results/history', label: 'Upload history', permission: 'plant.read' },
  { to: '/results/lots', label: 'Lots', permission: 'plant.read' },
] as const satisfies readonly { to: string; label: string; permission: Permission }[];

/** /results/*: upload and entry for the roles the permissions map allows them; the history and lots for every role. */
export default function ResultsArea() {
  const role = useSignedInUser().role;
  const shown = tabs.filter((tab) => may(role, tab.permission));

  return (
    <>
      <AreaTabs label="Results pages" tabs={shown} />
      <Suspense fallback={<Loading />}>
        <Routes>
          <Route index element={<Navigate to={shown[0].to} replace />} />
          <Route
            path="upload"
            element={
              <RequirePermission action="upload.create">
                <UploadPage />
              </RequirePermission>
            }
          />
          <Route
            path="enter"
            element={
              <RequirePermission action="measurement.create">
                <ManualEntryPage />
              </RequirePermission>
            }
          />
          <Route path="history" element={<UploadHistoryPage />} />
          <Route path="lots" element={<LotListPage />} />
          <Route path="lots/:lotNumber" element={<LotPage />} />
          <Route path="*" element={<NotFoundPage />} />
        </Routes>
      </Suspense>
    </>
  );
}
