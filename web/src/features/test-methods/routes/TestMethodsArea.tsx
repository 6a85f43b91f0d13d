import { Route, Routes } from 'react-router-dom';
import TestMethodListPage from './TestMethodListPage';
import TestMethodPage from './TestMethodPage';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';

/** /test-methods and /test-methods/:code, readable by every role. */
export default function TestMethodsArea() {
  return (
    <Routes>
      <Route index element={<TestMethodListPage />} />
      <Route path=":code" element={<TestMethodPage />} />
      <Route path="*" element={<NotFoundPage />} />
    </Routes>
  );
}
