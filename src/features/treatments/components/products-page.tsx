import { useState } from 'react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { useCreateProduct, useProducts, useUpdateProduct } from '../api/treatments';
import type { Product } from '../types';

/** The product catalogue (admin): what the treatment screen offers. Kind and unit are fixed once created. */
export function ProductsPage() {
  const { data, isPending, error } = useProducts(true);
  const update = useUpdateProduct();
  const [adding, setAdding] = useState(false);
  return (
    <>
      <PageHeader
        title="Product catalogue"
        subtitle="Fillers are recorded in mL, neuromodulator in units. Retired products stay on past records."
        actions={
          <Button variant="primary" onClick={() => setAdding(true)}>
            Add product
          </Button>
        }
      />
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Loading products" />
      ) : !data?.length ? (
        <EmptyState title="No products yet">Add the fillers and neuromodulators the clinic uses.</EmptyState>
      ) : (
        <Card>
          <table className="w-full text-[15px]">
            <thead>
              <tr className="border-b border-line text-left text-sm text-ink-muted">
                <th className="px-5 py-3 font-medium">Product</th>
                <th className="px-3 py-3 font-medium">Kind</th>
                <th className="px-3 py-3 font-medium">Pack</th>
                <th className="px-5 py-3" />
              </tr>
            </thead>
            <tbody>
              {data.map((p) => (
                <tr key={p.id} className="border-b border-line last:border-0">
                  <td className="px-5 py-3">
                    <span className="block font-medium">{p.name}</span>
                    <span className="text-sm text-ink-muted">{p.manufacturer}</span>
                  </td>
                  <td className="px-3 py-3">
                    <Badge tone={p.kind === 'filler' ? 'accent' : 'neutral'}>{p.kind === 'filler' ? 'Filler · mL' : 'Toxin · U'}</Badge>
                  </td>
                  <td className="px-3 py-3 font-mono text-sm">{p.packSize ? `${p.packSize} ${p.unit}` : '—'}</td>
                  <td className="px-5 py-3 text-right">
                    {!p.active && <Badge className="mr-2">Retired</Badge>}
                    <Button size="sm" busy={update.isPending && update.variables?.id === p.id} onClick={() => update.mutate({ id: p.id, active: !p.active })}>
                      {p.active ? 'Retire' : 'Bring back'}
                    </Button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </Card>
      )}
      <Dialog open={adding} onClose={() => setAdding(false)} title="Add a product">
        {adding && <ProductForm onDone={() => setAdding(false)} />}
      </Dialog>
    </>
  );
}

function ProductForm({ onDone }: { onDone: () => void }) {
  const create = useCreateProduct();
  const [name, setName] = useState('');
  const [manufacturer, setManufacturer] = useState('');
  const [kind, setKind] = useState<Product['kind']>('filler');
  const [packSize, setPackSize] = useState('1');
  const errors = create.error instanceof ApiError ? create.error.fieldErrors() : {};
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        create.mutate({ name, manufacturer, kind, unit: kind === 'filler' ? 'mL' : 'U', packSize: packSize ? Number(packSize) : null }, { onSuccess: onDone });
      }}
    >
      <Field label="Name" error={errors.name}>
        {(p) => <Input {...p} value={name} onChange={(e) => setName(e.target.value)} />}
      </Field>
      <Field label="Manufacturer" error={errors.manufacturer}>
        {(p) => <Input {...p} value={manufacturer} onChange={(e) => setManufacturer(e.target.value)} />}
      </Field>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Kind" hint="Fillers in mL, neuromodulator in units.">
          {(p) => (
            <Select
              {...p}
              value={kind}
              onChange={(e) => {
                const k = e.target.value as Product['kind'];
                setKind(k);
                setPackSize(k === 'filler' ? '1' : '100');
              }}
            >
              <option value="filler">Filler (mL)</option>
              <option value="toxin">Neuromodulator (U)</option>
            </Select>
          )}
        </Field>
        <Field label={`Pack size (${kind === 'filler' ? 'mL' : 'U'})`} error={errors.packSize}>
          {(p) => <Input {...p} inputMode="decimal" value={packSize} onChange={(e) => setPackSize(e.target.value)} />}
        </Field>
      </div>
      {create.error && !Object.keys(errors).length && <Notice tone="danger">{create.error.message}</Notice>}
      <div className="flex justify-end gap-2">
        <Button onClick={onDone}>Cancel</Button>
        <Button type="submit" variant="primary" busy={create.isPending}>
          Add product
        </Button>
      </div>
    </form>
  );
}
