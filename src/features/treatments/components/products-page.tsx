import { useState } from 'react';
import { ScanLine } from 'lucide-react';
import { LabelScanner } from '../../../components/label-scanner';
import { PRODUCT_KIND_LABELS, PRODUCT_KINDS, UNIT_OF_KIND } from '../../../../server/features/treatments/treatments.schemas';
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
        subtitle="Fillers are recorded in mL; neuromodulator and hyaluronidase in each product's own units. Retired products stay on past records."
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
        <EmptyState title="No products yet">Add the fillers, neuromodulators and hyaluronidase the clinic uses.</EmptyState>
      ) : (
        <Card>
          <table className="w-full text-[15px]">
            <thead>
              <tr className="border-b border-line text-left text-sm text-ink-muted">
                <th className="px-5 py-3 font-medium">Product</th>
                <th className="px-3 py-3 font-medium">Kind</th>
                <th className="px-3 py-3 font-medium">Pack</th>
                <th className="px-3 py-3 font-medium">GTIN</th>
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
                    <Badge tone={p.kind === 'filler' ? 'accent' : 'neutral'}>{PRODUCT_KIND_LABELS[p.kind]}</Badge>
                    <span className="mt-1 block text-sm text-ink-muted">{p.unit === 'U' ? (p.unitLabel ?? 'units (name them)') : 'mL'}</span>
                  </td>
                  <td className="px-3 py-3 font-mono text-sm">{p.packSize ? `${p.packSize} ${p.unit}` : '—'}</td>
                  <td className="px-3 py-3 font-mono text-sm">{p.gtin ?? '—'}</td>
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

const KIND_HINT: Record<Product['kind'], string> = {
  filler: 'HA filler, recorded in mL per zone.',
  toxin: 'Neuromodulator, recorded in its own units per zone.',
  hyaluronidase: 'Kept in the emergency kit and recorded in complication episodes.',
};

function ProductForm({ onDone }: { onDone: () => void }) {
  const create = useCreateProduct();
  const [name, setName] = useState('');
  const [manufacturer, setManufacturer] = useState('');
  const [kind, setKind] = useState<Product['kind']>('filler');
  const [unitLabel, setUnitLabel] = useState('');
  const [packSize, setPackSize] = useState('1');
  const [gtin, setGtin] = useState('');
  const [scanning, setScanning] = useState(false);
  const unit = UNIT_OF_KIND[kind];
  const errors = create.error instanceof ApiError ? create.error.fieldErrors() : {};
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        create.mutate(
          { name, manufacturer, kind, unit, unitLabel: unit === 'U' ? unitLabel : null, packSize: packSize ? Number(packSize) : null, gtin: gtin.trim() || null },
          { onSuccess: onDone },
        );
      }}
    >
      <Field label="Name" error={errors.name}>
        {(p) => <Input {...p} value={name} onChange={(e) => setName(e.target.value)} />}
      </Field>
      <Field label="Manufacturer" error={errors.manufacturer}>
        {(p) => <Input {...p} value={manufacturer} onChange={(e) => setManufacturer(e.target.value)} />}
      </Field>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Kind" hint={KIND_HINT[kind]}>
          {(p) => (
            <Select
              {...p}
              value={kind}
              onChange={(e) => {
                const k = e.target.value as Product['kind'];
                setKind(k);
                setPackSize(k === 'filler' ? '1' : k === 'toxin' ? '100' : '');
              }}
            >
              {PRODUCT_KINDS.map((k) => (
                <option key={k} value={k}>
                  {PRODUCT_KIND_LABELS[k]} ({UNIT_OF_KIND[k]})
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label={`Pack size (${unit === 'U' ? unitLabel || 'units' : 'mL'})`} error={errors.packSize} hint={unit === 'U' ? 'Units in one vial.' : 'mL in one syringe.'}>
          {(p) => <Input {...p} inputMode="decimal" value={packSize} onChange={(e) => setPackSize(e.target.value)} />}
        </Field>
      </div>
      {unit === 'U' && (
        <Field label="Name of its units" error={errors.unitLabel} hint="As the product labelling names them. Units of one product are not interchangeable with another's.">
          {(p) => <Input {...p} value={unitLabel} maxLength={40} placeholder="e.g. Harlowvale units" onChange={(e) => setUnitLabel(e.target.value)} />}
        </Field>
      )}
      <div className="flex items-end gap-2">
        <Field label="GTIN (from the box's barcode)" className="flex-1" error={errors.gtin} hint="Lets a scan of the box pick this product.">
          {(p) => <Input {...p} inputMode="numeric" value={gtin} autoComplete="off" onChange={(e) => setGtin(e.target.value)} />}
        </Field>
        <Button className="mb-7" onClick={() => setScanning(true)}>
          <ScanLine className="size-4" /> Scan
        </Button>
      </div>
      <LabelScanner
        open={scanning}
        title="Scan the box for its GTIN"
        onClose={() => setScanning(false)}
        onScan={(label) => {
          if (label.data.gtin) setGtin(label.data.gtin);
          setScanning(false);
        }}
      />
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
