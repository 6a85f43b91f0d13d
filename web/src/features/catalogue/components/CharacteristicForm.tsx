import { useEffect, useMemo } from 'react';
import { Link } from 'react-router-dom';
import { useForm, type FieldPath } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { chartTypes, chartTypeSizes, ruleSets, SUBGROUP_SIZE_MAX, suggestedChartType, type CreateCharacteristicInput } from '@shared/schemas/catalogue';
import type { TestMethodEntry } from '@web/lib/test-methods';
import { chartTypeLabels, ruleSetLabels } from '@shared/spc';
import { TextArea } from '@web/components/ui/TextArea';
import { showServerErrors } from '@web/lib/forms';
import type { PlantClock } from '@shared/time';
import { PlantDateField } from '@web/components/PlantDateInput';
import type { CharacteristicView, ProductView } from '@shared/schemas/catalogue';
import { useCreateCharacteristic, useUpdateCharacteristic } from '../api/catalogue';
import { characteristicFormSchema, emptySpec, newCharacteristicFormSchema, type CharacteristicFormValues } from '../lib/form-schemas';
import { shortMethodName, suggestedCode, suggestedName } from '../lib/suggest';
import { Field, Input, Select } from '@web/components/ui/Field';
import { Alert } from '@web/components/ui/Alert';
import { FormButtons } from '@web/components/ui/FormButtons';

const fields: FieldPath<CharacteristicFormValues>[] = [
  'productCode',
  'testMethodCode',
  'ageDays',
  'code',
  'name',
  'subgroupSize',
  'chartType',
  'ruleSet',
  'samplingPlan',
  'capabilityThreshold',
  'spec.lsl',
  'spec.target',
  'spec.usl',
  'spec.effectiveFrom',
  'spec.reason',
];

const chartShortNames = { imr: 'individuals', 'xbar-r': 'X̄–R', 'xbar-s': 'X̄–S' } as const;

const sizeRange = (chart: (typeof chartTypes)[number]) => {
  const { min, max } = chartTypeSizes[chart];
  return min === max ? `${min} reading` : `${min}–${max}`;
};

function startingValues(characteristic: CharacteristicView | undefined, products: ProductView[]): CharacteristicFormValues {
  if (!characteristic) {
    return {
      productCode: products.find((p) => p.active)?.code ?? '',
      testMethodCode: '',
      ageDays: '',
      code: '',
      name: '',
      subgroupSize: '1',
      chartType: 'imr',
      ruleSet: 'we',
      samplingPlan: '',
      capabilityThreshold: '',
      spec: emptySpec,
    };
  }
  return {
    productCode: characteristic.productCode,
    testMethodCode: characteristic.testMethodCode,
    ageDays: characteristic.ageDays === null ? '' : String(characteristic.ageDays),
    code: characteristic.code,
    name: characteristic.name,
    subgroupSize: String(characteristic.subgroupSize),
    chartType: characteristic.chartType,
    ruleSet: characteristic.ruleSet,
    samplingPlan: characteristic.samplingPlan ?? '',
    capabilityThreshold: characteristic.capabilityThreshold === null ? '' : String(characteristic.capabilityThreshold),
    spec: emptySpec,
  };
}

/**
 * Adds a characteristic (with its first specification revision when one is filled in), or changes
 * one given as `characteristic`. Once results are recorded under it, its code, product, test method
 * and age are shown, not offered.
 */
export function CharacteristicForm({
  characteristic,
  products,
  methods,
  clock,
  onSaved,
  onCancel,
}: {
  characteristic?: CharacteristicView;
  products: ProductView[];
  methods: TestMethodEntry[];
  clock: PlantClock;
  onSaved: (characteristic: CharacteristicView) => void;
  onCancel: () => void;
}) {
  const create = useCreateCharacteristic();
  const update = useUpdateCharacteristic();
  const adding = !characteristic;
  const newSchema = useMemo(() => newCharacteristicFormSchema(clock), [clock]);
  const {
    register,
    handleSubmit,
    setError,
    setValue,
    watch,
    getFieldState,
    formState: { errors },
  } = useForm<CharacteristicFormValues, unknown, CreateCharacteristicInput>({
    // Both give the request body: a new one with its optional first specification, a change without.
    resolver: adding ? zodResolver(newSchema) : zodResolver(characteristicFormSchema),
    defaultValues: startingValues(characteristic, products),
  });

  const [productCode, methodCode, ageDays, subgroupSize] = watch(['productCode', 'testMethodCode', 'ageDays', 'subgroupSize']);
  const method = methods.find((m) => m.code === methodCode);
  const product = products.find((p) => p.code === productCode);
  const fresh = method?.state === 'fresh';

  // While adding, code, name and chart follow the choices above them until the administrator types their own.
  useEffect(() => {
    if (!adding) return;
    if (fresh && ageDays !== '') setValue('ageDays', '');
    if (!getFieldState('code').isDirty) setValue('code', suggestedCode(productCode, methodCode, fresh ? '' : ageDays));
    if (!getFieldState('name').isDirty) setValue('name', suggestedName(product?.name, method, fresh ? '' : ageDays));
    const size = Number(subgroupSize);
    if (!getFieldState('chartType').isDirty && Number.isInteger(size) && size >= 1) setValue('chartType', suggestedChartType(size));
  }, [adding, fresh, productCode, methodCode, ageDays, subgroupSize, product, method, setValue, getFieldState]);

  const onSubmit = handleSubmit(async (input) => {
    try {
      onSaved(characteristic ? await update.mutateAsync({ id: characteristic.id, changes: input }) : await create.mutateAsync(input));
    } catch (error) {
      showServerErrors(error, setError, fields);
    }
  });

  const identityFixed = !!characteristic?.hasResults;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-6" aria-label={characteristic ? `Change characteristic ${characteristic.code}` : 'Add a characteristic'}>
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}

      <fieldset className="space-y-4">
        <legend className="mb-3 font-semibold text-zinc-900">What is tested</legend>
        {identityFixed ? (
          <div className="rounded-md border border-zinc-200 bg-zinc-50 px-4 py-3 text-zinc-800" data-testid="fixed-identity">
            <p>
              <span className="font-mono">{characteristic.code}</span> · {characteristic.productName} (<span className="font-mono">{characteristic.productCode}</span>) ·{' '}
              {characteristic.testMethodName}
              {characteristic.ageDays !== null && <> · {characteristic.ageDays} d</>} · <span className="font-mono">{characteristic.unit}</span>
            </p>
            <p className="mt-1 text-sm text-zinc-600">
              Results are recorded under this code, so code, product, test method and age stay as they are. To test something else, deactivate
              this characteristic and add a new one.
            </p>
          </div>
        ) : (
          <div className="grid gap-x-5 gap-y-4 sm:grid-cols-2 lg:grid-cols-4">
            <Field label="Product" error={errors.productCode?.message} className="lg:col-span-2">
              {(control) => (
                <Select {...control} {...register('productCode')}>
                  {products.map((p) => (
                    <option key={p.id} value={p.code}>
                      {p.code} · {p.name}
                      {p.active ? '' : ' (deactivated)'}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field label="Test method" error={errors.testMethodCode?.message} className="lg:col-span-2">
              {(control) => (
                <Select {...control} {...register('testMethodCode')}>
                  <option value="">Choose a test method…</option>
                  {methods.map((m) => (
                    <option key={m.code} value={m.code}>
                      {shortMethodName(m.name)} ({m.code}) · {m.unit}
                    </option>
                  ))}
                </Select>
              )}
            </Field>
            <Field
              label="Age at test (days)"
              hint={fresh ? 'Fresh-mortar test: no age.' : 'Hardened specimens, e.g. 1, 7 or 28.'}
              error={errors.ageDays?.message}
            >
              {(control) => <Input {...control} inputMode="numeric" readOnly={fresh} placeholder={fresh ? '–' : undefined} className="font-mono" autoComplete="off" {...register('ageDays')} />}
            </Field>
            <Field label="Unit" hint="From the test method.">
              {(control) => <Input {...control} readOnly value={method?.unit ?? ''} className="font-mono" tabIndex={-1} />}
            </Field>
            <Field label="Code" hint="Used in uploads; suggested from product, method and age." error={errors.code?.message} className="lg:col-span-2">
              {(control) => <Input {...control} autoComplete="off" className="font-mono uppercase" {...register('code')} />}
            </Field>
          </div>
        )}
        <Field label="Name" hint="On charts and reports." error={errors.name?.message}>
          {(control) => <Input {...control} autoComplete="off" {...register('name')} />}
        </Field>
        {method && (
          <p className="text-sm text-zinc-600">
            Method: {method.standard}. Possible range, raw readings and handling cautions:{' '}
            <Link to={`/test-methods/${method.code}`} className="text-accent-800 underline underline-offset-2">
              {method.name}
            </Link>
            .
          </p>
        )}
      </fieldset>

      <fieldset>
        <legend className="mb-3 font-semibold text-zinc-900">How it is charted</legend>
        <div className="grid gap-x-5 gap-y-4 sm:grid-cols-2 lg:grid-cols-[8rem_1fr_1.2fr]">
          <Field label="Subgroup size" hint={`Readings per lot, 1 to ${SUBGROUP_SIZE_MAX}; e.g. 6 prism halves.`} error={errors.subgroupSize?.message}>
            {(control) => <Input {...control} inputMode="numeric" autoComplete="off" className="font-mono" {...register('subgroupSize')} />}
          </Field>
          <Field label="Control chart" hint={chartTypes.map((chart) => `${chartShortNames[chart]}: ${sizeRange(chart)}`).join('; ')} error={errors.chartType?.message}>
            {(control) => (
              <Select {...control} {...register('chartType')}>
                {chartTypes.map((chart) => (
                  <option key={chart} value={chart}>
                    {chartTypeLabels[chart]}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Run rules" error={errors.ruleSet?.message}>
            {(control) => (
              <Select {...control} {...register('ruleSet')}>
                {ruleSets.map((set) => (
                  <option key={set} value={set}>
                    {ruleSetLabels[set]}
                  </option>
                ))}
              </Select>
            )}
          </Field>
        </div>
        {!adding && (
          <p className="mt-3 text-sm text-zinc-600">
            Frozen control limits belong to one chart type: after a change of chart, the chart shows trial limits until a quality manager freezes
            limits again.
          </p>
        )}
        <Field label="Sampling plan (optional)" hint="How often and what the lab samples, e.g. “First lot of each shift; a set of three prisms”." error={errors.samplingPlan?.message} className="mt-4">
          {(control) => <TextArea {...control} rows={2} {...register('samplingPlan')} />}
        </Field>
        <Field
          label="Capability threshold (optional)"
          hint="The nightly run raises an alarm when Cpk (Ppk while the chart is out of control) over the newest lots falls below it. Empty: the plant's threshold."
          error={errors.capabilityThreshold?.message}
          className="mt-4 max-w-sm"
        >
          {(control) => <Input {...control} inputMode="decimal" autoComplete="off" className="font-mono" placeholder="e.g. 1.33" {...register('capabilityThreshold')} />}
        </Field>
      </fieldset>

      {adding ? (
        <fieldset>
          <legend className="mb-1 font-semibold text-zinc-900">First specification (optional)</legend>
          <p className="mb-3 text-sm text-zinc-600">Leave empty to add it later under Specifications. Later changes are new revisions there.</p>
          <div className="grid gap-x-5 gap-y-4 sm:grid-cols-3">
            <Field label={`LSL${method ? ` (${method.unit})` : ''}`} hint="Lower specification limit; empty for none." error={errors.spec?.lsl?.message}>
              {(control) => <Input {...control} inputMode="decimal" autoComplete="off" className="font-mono" {...register('spec.lsl')} />}
            </Field>
            <Field label={`Target${method ? ` (${method.unit})` : ''}`} hint="Optional." error={errors.spec?.target?.message}>
              {(control) => <Input {...control} inputMode="decimal" autoComplete="off" className="font-mono" {...register('spec.target')} />}
            </Field>
            <Field label={`USL${method ? ` (${method.unit})` : ''}`} hint="Upper specification limit; empty for none." error={errors.spec?.usl?.message}>
              {(control) => <Input {...control} inputMode="decimal" autoComplete="off" className="font-mono" {...register('spec.usl')} />}
            </Field>
            <PlantDateField label="Effective from (optional)" kind="dateTime" hint="Empty: from now." error={errors.spec?.effectiveFrom?.message} {...register('spec.effectiveFrom')} />
            <Field label="Reason" hint="Kept with the revision and in the audit trail, e.g. “Lower limit from the declared class”." error={errors.spec?.reason?.message} className="sm:col-span-2">
              {(control) => <Input {...control} autoComplete="off" {...register('spec.reason')} />}
            </Field>
          </div>
        </fieldset>
      ) : (
        <p className="text-sm">
          <Link to={`/records/specifications/${characteristic.id}`} className="text-accent-800 underline underline-offset-2">
            Specification revisions of {characteristic.code}
          </Link>
        </p>
      )}

      <FormButtons saveLabel={adding ? 'Add characteristic' : 'Save changes'} busy={create.isPending || update.isPending} onCancel={onCancel} />
    </form>
  );
}
