import { lazy, Suspense } from 'react';
import { Navigate, NavLink, Route, Routes } from 'react-router';
import { useSignedInUser } from '../../auth/api/session';
import { RequireRole } from '../../../app/guards';
import { NotFoundPage } from '../../../app/routes/NotFoundPage';
import { Loading } from '../../../components/ui/Spinner';
import { cx } from '../../../components/ui/cx';
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
      <nav aria-label="Results pages" className="mb-6 border-b border-zinc-200">
        <ul className="-mb-px flex flex-wrap gap-x-1">
          {shown.map((tab) => (
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
