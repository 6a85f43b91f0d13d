/**
 * Prismline SPC engine: pure functions, no DOM, database or I/O, shared by the jobs, the API and the
 * web app. Every number it returns is finite or null; a null comes with a reason in plain words.
 *
 * Control charts
 *   computeChart({ subgroups } | { values, subgroupSize? | sizes? }, chart?, excluded?, frozen?, rules?)
 *     → ChartResult
 *     - subgroups: number[][] in time order, or values (a Float64Array is used without copying) with a
 *       common subgroupSize (default 1 = individuals) or per-subgroup sizes.
 *     - chart: 'xbar-r' | 'xbar-s' | 'imr'; default I–MR for single values, X̄–R for subgroups up to
 *       10, X̄–S above 10.
 *     - excluded: point positions with an assignable cause, left out of the phase I estimate and of
 *       the run rules (still plotted).
 *     - frozen: { chart, center, sigmaWithin } from an earlier result's `frozen` → phase II.
 *     - rules: 'we' (default, Western Electric 1–4), 'extended' (adds trend, alternating, hugging,
 *       mixture) or a list of RuleId.
 *     The result gives `location` and `dispersion` limits { center, ucl, lcl, sigma } (location also
 *     zone lines at ±1σ, ±2σ) for `limitsSubgroupSize`, `sigmaWithin`, `sigmaOverall`, `mean`,
 *     `frozen` (the limits to store for phase II), the columns in `points` (typed arrays: location,
 *     dispersion, hasDispersion, excluded, size; per-point limits in `points.perPoint` when subgroup
 *     sizes vary; for I–MR `location` is the input itself and the moving ranges are built on first
 *     read), `violations` [{ rule, chart: 'location'|'dispersion', index, points }] sorted by point,
 *     and `reasons` [{ code, message }]. Run-rule conventions (ties, points on a line, overlapping
 *     windows, exclusions) are listed at the top of rules.ts.
 *   pointAt(result, i) / pointList(result) → ChartPoint: one point as plain values, null where absent.
 *
 * Capability
 *   computeCapability({ values, sigmaWithin, lsl?, usl?, target?, subgroupCount?, normality? })
 *     → CapabilityResult: cp, cpk, cpl, cpu, pp, ppk, ppl, ppu, cpm, 95 % intervals, ppmExpected
 *       (overall), ppmExpectedWithin, ppmObserved, the Anderson–Darling result, `preliminary` and
 *       plain-words `notes`.
 *   andersonDarling(values) → NormalityResult { test, n, statistic, adjusted, p, reason }.
 *
 * Run rules
 *   ruleDescriptions (full sentences) and ruleLabels (short names): Record<RuleId, string>;
 *   WESTERN_ELECTRIC_RULES, EXTENDED_RULES; RULE_SETS and ruleSetLabels; resolveRules.
 *
 * Chart types: CHART_TYPES, chartTypeLabels, statisticNames; PHASE_ONE_MIN_POINTS, the kept points
 * below which trial limits are preliminary.
 *
 * Specification (specification.ts): specAt (the revision in force at a production time), lotResult
 * (the mean of the live replicates), specVerdict ('in' | 'below-lsl' | 'above-usl' | 'no-spec', a
 * result on a limit is in), isOutOfSpec, brokenLimit, beyondStrictestLimits (the import's prefilter).
 *
 * Constants (any subgroup size from 2): d2, d3, c4 from their definitions; A2, A3, B3, B4, D3, D4, E2.
 * Distributions: normalCdf, normalQuantile, chiSquareCdf, chiSquareQuantile, lnGamma.
 *
 * Programming errors (non-finite values, impossible sizes, bad exclusion indices) throw SpcInputError;
 * properties of the data (too few points, no variation, missing specification) never throw.
 */
export { CHART_TYPES, chartTypeLabels, computeChart, PHASE_ONE_MIN_POINTS, pointAt, pointList, statisticNames } from './charts';
export type { ChartInput, ChartPoint, ChartResult, ChartType, FrozenLimits, Limits, LocationLimits, PointColumns, Reason, ReasonCode } from './charts';
export { computeCapability, CAPABILITY_MIN_SUBGROUPS, CAPABILITY_MIN_VALUES } from './capability';
export type { CapabilityInput, CapabilityNote, CapabilityNoteCode, CapabilityResult, Interval } from './capability';
export { CAPABILITY_WINDOW_LOTS, capabilityCrossing, capabilityReading, DEFAULT_CAPABILITY_THRESHOLD } from './capability-watch';
export type { CapabilityCrossing, CapabilityReading } from './capability-watch';
export { andersonDarling, andersonDarlingPValue, NORMALITY_MIN_VALUES } from './normality';
export type { NormalityResult } from './normality';
export { EXTENDED_RULES, RULE_SETS, WESTERN_ELECTRIC_RULES, resolveRules, ruleDescriptions, ruleLabels, ruleSetLabels } from './rules';
export type { ChartPart, RuleId, RuleSelection, RuleSetId, Violation } from './rules';
export { alarmSentence, capabilitySentence, limitWords, signalName, signalNames, signalRank, statisticWords } from './alarm-words';
export type { AlarmWordsInput, CapabilityWordsInput } from './alarm-words';
export { beyondStrictestLimits, brokenLimit, isOutOfSpec, lotResult, specAt, specVerdict } from './specification';
export type { SpecificationLimits, SpecificationRevision, SpecVerdict } from './specification';
export { A2, A3, B3, B4, c4, d2, d3, D3, D4, E2 } from './constants';
export { chiSquareCdf, chiSquareQuantile, lnGamma, normalCdf, normalQuantile } from './distributions';
export { SpcInputError } from './errors';
