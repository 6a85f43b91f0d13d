import { useMemo } from 'react';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { http } from './http';
import type { CharacteristicView, LineView, PlantView, ProductView, SpecInForce } from '@shared/schemas/catalogue';
import { useTestMethods, type TestMethodEntry } from './test-methods';
import { FALLBACK_PLANT_CLOCK, type PlantClock } from '@shared/time';

// The catalogue as the API answers it (every role gets the same fields), by the names the screens use.
export type Product = ProductView;
export type ProductionLine = LineView;
export type Characteristic = CharacteristicView;
export type Plant = PlantView;
export type { SpecInForce };

export const catalogueKeys = {
  all: ['catalogue'] as const,
  products: () => [...catalogueKeys.all, 'products'] as const,
  lines: () => [...catalogueKeys.all, 'lines'] as const,
  characteristics: () => [...catalogueKeys.all, 'characteristics'] as const,
  plants: () => [...catalogueKeys.all, 'plants'] as const,
};

const items = async <T>(path: string, signal?: AbortSignal) => (await http<{ items: T[] }>(path, { signal })).items;

export const productsQueryOptions = () =>
  queryOptions({ queryKey: catalogueKeys.products(), queryFn: ({ signal }) => items<Product>('/api/v1/products', signal) });

export const linesQueryOptions = () =>
  queryOptions({ queryKey: catalogueKeys.lines(), queryFn: ({ signal }) => items<ProductionLine>('/api/v1/lines', signal) });

export const characteristicsQueryOptions = () =>
  queryOptions({ queryKey: catalogueKeys.characteristics(), queryFn: ({ signal }) => items<Characteristic>('/api/v1/characteristics', signal) });

export const plantsQueryOptions = () =>
  queryOptions({ queryKey: catalogueKeys.plants(), queryFn: ({ signal }) => items<Plant>('/api/v1/plants', signal), staleTime: Infinity });

export function useProducts() {
  return useQuery(productsQueryOptions());
}

export function useLines() {
  return useQuery(linesQueryOptions());
}

export function useCharacteristics() {
  return useQuery(characteristicsQueryOptions());
}

const selectClock = (plants: PlantView[]): PlantClock => ({ timeZone: plants[0]?.timeZone ?? FALLBACK_PLANT_CLOCK.timeZone, dateFormat: plants[0]?.dateFormat ?? FALLBACK_PLANT_CLOCK.dateFormat });

/** The plant's zone and date format: every time on a page is shown and typed with it (shared/time). */
export function usePlantClock() {
  return useQuery({ ...plantsQueryOptions(), select: selectClock });
}

export interface EntryCatalogue {
  timeZone: string;
  products: Product[];
  lines: ProductionLine[];
  characteristics: Characteristic[];
  testMethods: TestMethodEntry[];
}

/** Everything entering results needs to know of the plant, loaded together: one loading and one error state. */
export function useEntryCatalogue() {
  const products = useProducts();
  const lines = useLines();
  const characteristics = useCharacteristics();
  const testMethods = useTestMethods();
  const clock = usePlantClock();
  const queries = [products, lines, characteristics, testMethods, clock];
  const failed = queries.find((q) => q.isError);
  const data = useMemo<EntryCatalogue | undefined>(
    () =>
      products.data && lines.data && characteristics.data && testMethods.data && clock.data
        ? { products: products.data, lines: lines.data, characteristics: characteristics.data, testMethods: testMethods.data, timeZone: clock.data.timeZone }
        : undefined,
    [products.data, lines.data, characteristics.data, testMethods.data, clock.data],
  );
  return {
    data,
    error: failed?.error ?? null,
    retry: () => queries.filter((q) => q.isError).forEach((q) => q.refetch()),
  };
}
