/**
 * The invented demo scenario: Harrow Vale Mortar Works, one dry-mix plant with two lines, and a
 * deterministic generator for six months of lab results in the canonical long upload format.
 * Pure data and functions: no database, no files, no clock. plant.ts holds the plant, its products
 * and characteristics with their specifications; calendar.ts the plant clock, the production
 * schedule and the working mornings the quality manager's decisions are dated on; causes.ts the
 * planted special causes and the process log; generator.ts the results.
 */
export { type Characteristic, type ChartType, type Line, type LineCode, type Product, type ProductCode, type ProductFamily, type RuleSet, type Shift, type ShiftCode, type Spec, characteristics, lines, plant, products, shifts } from './plant';
export { DECISION_HOUR, nextWorkingMorning, plantIso, plantOffsetMinutes, specificationIssuedAt } from './calendar';
export { type PlantedCause, type ProcessEvent, type ScenarioWindow, plantedCauseTiming, plantedCausesFor, processEventsFor } from './causes';
export { type DemoResultRow, type GenerateOptions, canonicalCsvHeader, generateDemoResults, toCanonicalCsv } from './generator';
