import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type {
  CharacteristicView,
  CreateCharacteristicInput,
  CreateLineInput,
  CreateProductInput,
  LineView,
  ProductView,
  UpdateCharacteristicInput,
  UpdateLineInput,
  UpdateProductInput,
} from '@shared/schemas/catalogue';
import type { PlantView } from '@shared/schemas/catalogue';
import type { UpdatePlantInput } from '@shared/schemas/plants';
import { catalogueKeys } from '@web/lib/catalogue';
import { chartKeys } from '@web/lib/query-keys';
import { overviewKeys } from '@web/lib/query-keys';

const items = async <T>(path: string, signal?: AbortSignal) => (await http<{ items: T[] }>(path, { signal })).items;

export const fetchLines = (signal?: AbortSignal) => items<LineView>('/api/v1/lines', signal);
export const fetchProducts = (signal?: AbortSignal) => items<ProductView>('/api/v1/products', signal);
export const fetchCharacteristics = (signal?: AbortSignal) => items<CharacteristicView>('/api/v1/characteristics', signal);

export const createLine = (input: CreateLineInput) => http<LineView>('/api/v1/lines', { method: 'POST', body: input });
export const updateLine = (id: number, changes: UpdateLineInput) => http<LineView>(`/api/v1/lines/${id}`, { method: 'PATCH', body: changes });
export const createProduct = (input: CreateProductInput) => http<ProductView>('/api/v1/products', { method: 'POST', body: input });
export const updateProduct = (id: number, changes: UpdateProductInput) => http<ProductView>(`/api/v1/products/${id}`, { method: 'PATCH', body: changes });
export const createCharacteristic = (input: CreateCharacteristicInput) => http<CharacteristicView>('/api/v1/characteristics', { method: 'POST', body: input });
export const updatePlant = (id: number, changes: UpdatePlantInput) => http<PlantView>(`/api/v1/plants/${id}`, { method: 'PATCH', body: changes });
export const updateCharacteristic = (id: number, changes: UpdateCharacteristicInput) =>
  http<CharacteristicView>(`/api/v1/characteristics/${id}`, { method: 'PATCH', body: changes });

// The same endpoints and keys as the results area's lists (every role gets the same fields), so one
// request serves both screens; a change here invalidates `catalogueKeys.all`, refreshing every reader.
export const catalogueLinesQueryOptions = () => queryOptions({ queryKey: catalogueKeys.lines(), queryFn: ({ signal }) => fetchLines(signal) });
export const catalogueProductsQueryOptions = () => queryOptions({ queryKey: catalogueKeys.products(), queryFn: ({ signal }) => fetchProducts(signal) });
export const catalogueCharacteristicsQueryOptions = () =>
  queryOptions({ queryKey: catalogueKeys.characteristics(), queryFn: ({ signal }) => fetchCharacteristics(signal) });

export function useCatalogueLines() {
  return useQuery(catalogueLinesQueryOptions());
}

export function useCatalogueProducts() {
  return useQuery(catalogueProductsQueryOptions());
}

export function useCatalogueCharacteristics() {
  return useQuery(catalogueCharacteristicsQueryOptions());
}

/** Names, codes and chart settings show on every screen, so a change refreshes the catalogue, the charts and the overview. */
function useCatalogueMutation<Args, Result>(mutationFn: (args: Args) => Promise<Result>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn,
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: catalogueKeys.all }),
        queryClient.invalidateQueries({ queryKey: chartKeys.all }),
        queryClient.invalidateQueries({ queryKey: overviewKeys.all }),
      ]),
  });
}

export const useCreateLine = () => useCatalogueMutation(createLine);
export const useUpdateLine = () => useCatalogueMutation(({ id, changes }: { id: number; changes: UpdateLineInput }) => updateLine(id, changes));
export const useCreateProduct = () => useCatalogueMutation(createProduct);
export const useUpdateProduct = () => useCatalogueMutation(({ id, changes }: { id: number; changes: UpdateProductInput }) => updateProduct(id, changes));
export const useCreateCharacteristic = () => useCatalogueMutation(createCharacteristic);
export const useUpdateCharacteristic = () =>
  useCatalogueMutation(({ id, changes }: { id: number; changes: UpdateCharacteristicInput }) => updateCharacteristic(id, changes));
// The date format shows on every page: the catalogue's refresh takes the plants along.
export const useUpdatePlant = () => useCatalogueMutation(({ id, changes }: { id: number; changes: UpdatePlantInput }) => updatePlant(id, changes));
