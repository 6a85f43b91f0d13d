import { lazy, Suspense } from 'react';
import { Navigate, Route, Routes } from 'react-router-dom';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { Loading } from '@web/components/ui/Spinner';
import { AreaTabs } from '@web/components/ui/AreaTabs';

const CharacteristicsPage = lazy(() => import('./CharacteristicsPage'));
const ProductsPage = lazy(() => import('./ProductsPage'));
const LinesPage = lazy(() => import('./LinesPage'));

// In the order a new plant is set up: lines, then products on them, then what is tested on each.
const tabs = [
  { to: '/admin/catalogue/lines', label: 'Production lines' },
  { to: '/admin/catalogue/products', label: 'Products' },
  { to: '/admin/catalogue/characteristics', label: 'Characteristics' },
] as const;

/** /admin/catalogue/*: the administrator sets up lines, products and characteristics; every role reads them elsewhere. */
export default function CatalogueArea() {
  return (
    <>
      <AreaTabs label="Catalogue pages" tabs={tabs} />
      <Suspense fallback={<Loading />}>
        <Routes>
          <Route index element={<Navigate to="/admin/catalogue/characteristics" replace />} />
          <Route path="characteristics" element={<CharacteristicsPage />} />
          <Route path="products" element={<ProductsPage />} />
          <Route path="lines" element={<LinesPage />} />
          <Route path="*" element={<NotFoundPage />} />
        </Routes>
      </Suspense>
    </>
  );
}
