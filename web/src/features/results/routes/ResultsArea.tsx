import { lazy, Suspense } from 'react';
import { Navigate, Route, Routes } from 'react-router';
import { useSignedInUser } from '@web/features/auth/api/session';
import { RequireRole } from '@web/app/guards';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { Loading } from '@web/components/ui/Spinner';
import { AreaTabs } from '@web/components/ui/AreaTabs';
import { entryRoles } from '../lib/roles';

const UploadPage = lazy(() => import('./UploadPage'));
const ManualEntryPage = lazy(() => import('./ManualEntryPage'));
const UploadHistoryPage = lazy(() => import('./UploadHistoryPage'));
const LotPage = lazy(() => import('./LotPage'));

const tabs = [
  { to: '/results/upload', label: 'Upload a file', entry: true },
  { to: '/results/enter', label: 'Enter a lot by hand', entry: true },
  { to: '/results/history', label: 'Upload history', entry: false },
] as const;

/** /results/*: entry for technicians, managers and administrators; the history and lots for every role. */
export default function ResultsArea() {
  const user = useSignedInUser();
  const canEnter = entryRoles.includes(user.role);
  const shown = tabs.filter((tab) => canEnter || !tab.entry);

  return (
    <>
      <AreaTabs label="Results pages" tabs={shown} />
      <Suspense fallback={<Loading />}>
        <Routes>
          <Route index element={<Navigate to={canEnter ? '/results/upload' : '/results/history'} replace />} />
          <Route
            path="upload"
            element={
              <RequireRole roles={entryRoles}>
                <UploadPage />
              </RequireRole>
            }
          />
          <Route
            path="enter"
            element={
              <RequireRole roles={entryRoles}>
                <ManualEntryPage />
              </RequireRole>
            }
          />
          <Route path="history" element={<UploadHistoryPage />} />
          <Route path="lots/:lotNumber" element={<LotPage />} />
          <Route path="*" element={<NotFoundPage />} />
        </Routes>
      </Suspense>
    </>
  );
}
