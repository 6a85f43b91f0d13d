import { lazy, Suspense } from 'react';
import { Route, Routes } from 'react-router-dom';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { Loading } from '@web/components/ui/Spinner';
import ChartsIndexPage from './ChartsIndexPage';

// echarts comes with the page of one chart, not with the list of charts.
const ChartPage = lazy(() => import('./ChartPage'));

/** /charts (pick a characteristic) and /charts/:characteristicId (its chart; ?lot=<lot number> opens it at that lot). */
export default function ChartsArea() {
  return (
    <Suspense fallback={<Loading label="Loading the chart…" />}>
      <Routes>
        <Route index element={<ChartsIndexPage />} />
        <Route path=":characteristicId" element={<ChartPage />} />
        <Route path="*" element={<NotFoundPage />} />
      </Routes>
    </Suspense>
  );
}
