import { z } from 'zod';
import { characteristicSettingsSchema, createCharacteristicSchema, type RuleSetId } from '@shared/schemas/catalogue';
import type { TestMethodCode } from '@shared/lab';
import type { ChartType } from '@shared/spc';
import { typedNumber } from '@web/lib/form-values';
import type { PlantClock } from '@shared/time';
import { plantDateText } from '@web/lib/plant-dates';

// The characteristic form keeps what was typed (numbers with a decimal comma or point, a date-time
// in the plant's format and zone) and turns it into the request body before the shared schema checks it, so the schema's
// rules and messages land on the same field names. Codes picked from lists are only typed here; the
// shared schema refuses anything else.

const typed = z.string();

const settingsFields = {
  productCode: typed,
  testMethodCode: typed,
  ageDays: typed,
  code: typed,
  name: typed,
  subgroupSize: typed,
  chartType: typed,
  ruleSet: typed,
  samplingPlan: typed,
  capabilityThreshold: typed,
};
const specFields = { lsl: typed, target: typed, usl: typed, effectiveFrom: typed, reason: typed };

export type CharacteristicFormValues = { [K in keyof typeof settingsFields]: string } & { spec: { [K in keyof typeof specFields]: string } };

function settings(form: Omit<CharacteristicFormValues, 'spec'>): z.input<typeof characteristicSettingsSchema> {
  return {
    productCode: form.productCode,
    testMethodCode: form.testMethodCode as TestMethodCode,
    // A fresh-mortar test has no age: an empty field is "none", not a missing number.
    ageDays: form.ageDays.trim() === '' ? null : (typedNumber(form.ageDays) ?? null),
    code: form.code,
    name: form.name,
    subgroupSize: typedNumber(form.subgroupSize) as number,
    chartType: form.chartType as ChartType,
    ruleSet: form.ruleSet as RuleSetId,
    samplingPlan: form.samplingPlan,
    // Blank: the plant's threshold applies.
    capabilityThreshold: form.capabilityThreshold.trim() === '' ? null : (typedNumber(form.capabilityThreshold) ?? Number.NaN),
  };
}

/** A limit left blank is no limit: a one-sided specification. */
const limit = (text: string) => (text.trim() === '' ? null : typedNumber(text));

/** The specification part counts as given once any of its fields is filled in. */
const specGiven = (spec: Record<string, string | undefined>) => Object.values(spec).some((text) => text !== undefined && text.trim() !== '');

/** Adding a characteristic, with its first specification revision when one is filled in. */
export const newCharacteristicFormSchema = (clock: PlantClock) =>
  z
    .object({ ...settingsFields, spec: z.object({ ...specFields, effectiveFrom: plantDateText('dateTime', clock) }) })
    .transform(
      ({ spec, ...form }): z.input<typeof createCharacteristicSchema> => ({
        ...settings(form),
        spec: specGiven(spec)
          ? { lsl: limit(spec.lsl), usl: limit(spec.usl), target: limit(spec.target), effectiveFrom: spec.effectiveFrom, reason: spec.reason }
          : undefined,
      }),
    )
    .pipe(createCharacteristicSchema);

/** Changing a characteristic's settings; its specification has its own revisions, so the form's spec part is left out. */
export const characteristicFormSchema = z
  .object({ ...settingsFields, spec: z.object(specFields) })
  .transform(({ spec: _spec, ...form }) => settings(form))
  .pipe(characteristicSettingsSchema);

export const emptySpec: CharacteristicFormValues['spec'] = { lsl: '', target: '', usl: '', effectiveFrom: '', reason: '' };
