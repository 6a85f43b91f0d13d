import { useId } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { createProductSchema } from '@shared/schemas/catalogue';
import { showServerErrors } from '@web/lib/forms';
import type { LineView, ProductView } from '@shared/schemas/catalogue';
import { useCreateProduct, useUpdateProduct } from '../api/catalogue';
import { Field, Input, Select } from '@web/components/ui/Field';
import { Alert } from '@web/components/ui/Alert';
import { FormButtons } from '@web/components/ui/FormButtons';

const fields = ['code', 'name', 'family', 'declaredClass', 'lineCode'] as const;

/** Adds a product, or changes one given as `product`; its code is fixed once lots of it are recorded. */
export function ProductForm({
  product,
  lines,
  families,
  onSaved,
  onCancel,
}: {
  product?: ProductView;
  lines: LineView[];
  /** Families already in use, offered as suggestions. */
  families: string[];
  onSaved: (product: ProductView) => void;
  onCancel: () => void;
}) {
  const create = useCreateProduct();
  const update = useUpdateProduct();
  const familyList = useId();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({
    resolver: zodResolver(createProductSchema),
    defaultValues: {
      code: product?.code ?? '',
      name: product?.name ?? '',
      family: product?.family ?? '',
      declaredClass: product?.declaredClass ?? '',
      lineCode: product?.lineCode ?? lines.find((line) => line.active)?.code ?? '',
    },
  });

  const onSubmit = handleSubmit(async (input) => {
    try {
      onSaved(product ? await update.mutateAsync({ id: product.id, changes: input }) : await create.mutateAsync(input));
    } catch (error) {
      showServerErrors(error, setError, fields);
    }
  });

  const codeFixed = !!product?.hasLots;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5" aria-label={product ? `Change product ${product.code}` : 'Add a product'}>
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-x-5 gap-y-4 sm:grid-cols-2 lg:grid-cols-3">
        <Field label="Code" hint={codeFixed ? 'Fixed: lots of this product are recorded under it.' : 'Written on lots and in uploads, e.g. HVL25.'} error={errors.code?.message}>
          {(control) => <Input {...control} readOnly={codeFixed} autoComplete="off" className="font-mono uppercase" {...register('code')} />}
        </Field>
        <Field label="Name" hint="The trade name, e.g. “HV Level 25”." error={errors.name?.message} className="lg:col-span-2">
          {(control) => <Input {...control} autoComplete="off" {...register('name')} />}
        </Field>
        <Field label="Family" hint="One word; the overview filters by it, e.g. levelling, tile-adhesive, repair." error={errors.family?.message}>
          {(control) => (
            <>
              <Input {...control} list={familyList} autoComplete="off" {...register('family')} />
              <datalist id={familyList}>
                {families.map((family) => (
                  <option key={family} value={family} />
                ))}
              </datalist>
            </>
          )}
        </Field>
        <Field
          label="Declared class (optional)"
          hint="As on the bag: CT-C25-F6 (EN 13813, checked against its classes), C2TE S1, R3."
          error={errors.declaredClass?.message}
        >
          {(control) => <Input {...control} autoComplete="off" className="font-mono" {...register('declaredClass')} />}
        </Field>
        <Field label="Production line" error={errors.lineCode?.message}>
          {(control) => (
            <Select {...control} {...register('lineCode')}>
              {/* A deactivated line takes no new product; a product already on one keeps showing it. */}
              {lines
                .filter((line) => line.active || line.code === product?.lineCode)
                .map((line) => (
                  <option key={line.id} value={line.code}>
                    {line.code} · {line.name}
                  </option>
                ))}
            </Select>
          )}
        </Field>
      </div>
      <FormButtons saveLabel={product ? 'Save changes' : 'Add product'} busy={create.isPending || update.isPending} onCancel={onCancel} />
    </form>
  );
}
