// The six categories of cause used in cause-and-effect analysis (common practice in quality work),
// shared by alarm outcomes and NCR root causes. Kept free of zod.

export const causeCategories = ['material', 'method', 'machine', 'people', 'measurement', 'environment'] as const;
export type CauseCategory = (typeof causeCategories)[number];

/** What each category covers at a dry-mix mortar plant, for the pick list. */
export const causeCategoryWords: Record<CauseCategory, { label: string; hint: string }> = {
  material: { label: 'Material', hint: 'raw materials: sand source, binder, additives, a delivery' },
  method: { label: 'Method', hint: 'recipe, procedure, mixing time, sampling' },
  machine: { label: 'Machine', hint: 'mixer, dosing scales, packing, silo' },
  people: { label: 'People', hint: 'training, shift hand-over, a step missed' },
  measurement: { label: 'Measurement', hint: 'test equipment, calibration, specimen preparation' },
  environment: { label: 'Environment', hint: 'temperature, humidity, curing room' },
};
