import { useState } from 'react';
import { Link } from 'react-router-dom';
import { BarChart3, PackagePlus, ScanLine } from 'lucide-react';
import { LabelScanner } from '../../../components/label-scanner';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { formatDate } from '../../../lib/format';
import { useAdjustLot, useReceiveLot, useStock, useStockProducts } from '../api/stock';
import type { LotView } from '../types';
import { EmergencyKitNotice } from './emergency-kit-notice';
import { LotStatusBadge, packsText } from './stock-status';

/** The shelf: every lot per product with its expiry and packs on hand; clinicians receive and correct stock. */
export function StockPage({ canEdit }: { canEdit: boolean }) {
  const [all, setAll] = useState(false);
  const { data, isPending, error } = useStock(all);
  const [receiving, setReceiving] = useState(false);
  const [adjusting, setAdjusting] = useState<LotView | null>(null);
  const byProduct = new Map<string, LotView[]>();
  for (const l of data?.lots ?? []) byProduct.set(l.productName, [...(byProduct.get(l.productName) ?? []), l]);

  return (
    <>
      <PageHeader
        title="Stock"
        subtitle={data ? `Lots on the shelf, counted in syringes and vials, against ${formatDate(data.date)}.` : undefined}
        actions={
          <>
            {canEdit && (
              <Link to="/stock/usage" className="inline-flex min-h-11 items-center gap-2 rounded-lg border border-line-strong bg-paper-raised px-4 text-[15px] font-medium hover:bg-paper-sunk">
                <BarChart3 className="size-4" aria-hidden /> Monthly usage
              </Link>
            )}
            {canEdit && (
              <Button variant="primary" onClick={() => setReceiving(true)}>
                <PackagePlus className="size-4" /> Receive stock
              </Button>
            )}
          </>
        }
      />
      <div className="mb-4">
        <EmergencyKitNotice />
      </div>
      <label className="mb-3 flex min-h-11 items-center gap-2 text-sm text-ink-muted">
        <input type="checkbox" className="size-5 accent-[var(--color-accent)]" checked={all} onChange={(e) => setAll(e.target.checked)} /> Show used-up lots too
      </label>
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Loading stock" />
      ) : !data?.lots.length ? (
        <EmptyState title="Nothing on the shelf yet">{canEdit ? 'Receive a delivery: scan the box or type its lot and expiry.' : 'Clinicians record deliveries here.'}</EmptyState>
      ) : (
        <div className="space-y-4">
          {[...byProduct.entries()].map(([name, lots]) => (
            <Card key={name}>
              <div className="flex items-baseline justify-between border-b border-line px-5 py-3">
                <h2 className="text-lg font-semibold">{name}</h2>
                <span className="text-sm text-ink-muted">{lots.reduce((n, l) => n + l.onHand, 0)} on hand</span>
              </div>
              <table className="w-full text-[15px]">
                <thead>
                  <tr className="border-b border-line text-left text-sm text-ink-muted">
                    <th className="px-5 py-2 font-medium">Lot</th>
                    <th className="px-3 py-2 font-medium">Expiry</th>
                    <th className="px-3 py-2 font-medium">On hand</th>
                    <th className="px-5 py-2" />
                  </tr>
                </thead>
                <tbody>
                  {lots.map((l) => (
                    <tr key={l.id} className="border-b border-line last:border-0" data-lot={l.lotNumber}>
                      <td className="px-5 py-2.5 font-mono text-sm">{l.lotNumber}</td>
                      <td className="px-3 py-2.5">
                        <span className="mr-2">{formatDate(l.expiryDate)}</span>
                        <LotStatusBadge lot={l} />
                      </td>
                      <td className="px-3 py-2.5 tabular-nums" data-testid="on-hand">
                        {packsText(l)}
                      </td>
                      <td className="px-5 py-2 text-right">
                        {canEdit && (
                          <Button size="sm" onClick={() => setAdjusting(l)}>
                            Correct count
                          </Button>
                        )}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </Card>
          ))}
        </div>
      )}
      <Dialog open={receiving} onClose={() => setReceiving(false)} title="Receive stock">
        {receiving && <ReceiveForm onDone={() => setReceiving(false)} />}
      </Dialog>
      <Dialog open={!!adjusting} onClose={() => setAdjusting(null)} title={adjusting ? `Correct the count of lot ${adjusting.lotNumber}` : 'Correct the count'}>
        {adjusting && <AdjustForm lot={adjusting} onDone={() => setAdjusting(null)} />}
      </Dialog>
    </>
  );
}

function ReceiveForm({ onDone }: { onDone: () => void }) {
  const products = useStockProducts();
  const receive = useReceiveLot();
  const [productId, setProductId] = useState('');
  const [lotNumber, setLotNumber] = useState('');
  const [expiryDate, setExpiryDate] = useState('');
  const [quantity, setQuantity] = useState('1');
  const [scanning, setScanning] = useState(false);
  const [scanNote, setScanNote] = useState<{ tone: 'done' | 'warn'; text: string } | null>(null);
  const errors = receive.error instanceof ApiError ? receive.error.fieldErrors() : {};
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        receive.mutate({ productId, lotNumber, expiryDate, quantity: Number(quantity) }, { onSuccess: onDone });
      }}
    >
      <Button onClick={() => setScanning(true)}>
        <ScanLine className="size-4" /> Scan the box
      </Button>
      {scanNote && <Notice tone={scanNote.tone}>{scanNote.text}</Notice>}
      <Field label="Product" error={errors.productId}>
        {(p) => (
          <Select {...p} value={productId} onChange={(e) => setProductId(e.target.value)}>
            <option value="">Choose a product…</option>
            {(products.data ?? []).map((x) => (
              <option key={x.id} value={x.id}>
                {x.name}
              </option>
            ))}
          </Select>
        )}
      </Field>
      <div className="grid gap-3 sm:grid-cols-3">
        <Field label="Lot number" error={errors.lotNumber}>
          {(p) => <Input {...p} value={lotNumber} maxLength={40} autoComplete="off" onChange={(e) => setLotNumber(e.target.value)} />}
        </Field>
        <Field label="Expiry date" error={errors.expiryDate}>
          {(p) => <Input {...p} type="date" value={expiryDate} onChange={(e) => setExpiryDate(e.target.value)} />}
        </Field>
        <Field label="Packs received" error={errors.quantity} hint="Syringes or vials.">
          {(p) => <Input {...p} inputMode="numeric" value={quantity} onChange={(e) => setQuantity(e.target.value)} />}
        </Field>
      </div>
      {receive.error && !Object.keys(errors).length && <Notice tone="danger">{receive.error.message}</Notice>}
      <div className="flex justify-end gap-2">
        <Button onClick={onDone}>Cancel</Button>
        <Button type="submit" variant="primary" busy={receive.isPending} disabled={!productId || !lotNumber || !expiryDate}>
          Receive
        </Button>
      </div>
      <LabelScanner
        open={scanning}
        onClose={() => setScanning(false)}
        onScan={({ data }) => {
          setScanning(false);
          const product = data.gtin ? products.data?.find((p) => p.gtin === data.gtin) : undefined;
          if (product) setProductId(product.id);
          if (data.lotNumber) setLotNumber(data.lotNumber);
          if (data.expiryDate) setExpiryDate(data.expiryDate);
          setScanNote(
            product || !data.gtin
              ? { tone: 'done', text: `Read from the label${product ? `: ${product.name}` : ''}. Check the details against the box.` }
              : { tone: 'warn', text: `GTIN ${data.gtin} is not in the catalogue: choose the product by hand (an admin can add the GTIN to it).` },
          );
        }}
      />
    </form>
  );
}

function AdjustForm({ lot, onDone }: { lot: LotView; onDone: () => void }) {
  const adjust = useAdjustLot();
  const [delta, setDelta] = useState('-1');
  const [reason, setReason] = useState<'returned' | 'discarded' | 'counted'>('discarded');
  const [note, setNote] = useState('');
  const errors = adjust.error instanceof ApiError ? adjust.error.fieldErrors() : {};
  return (
    <form
      className="space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        adjust.mutate({ id: lot.id, delta: Number(delta), reason, note }, { onSuccess: onDone });
      }}
    >
      <p className="text-sm text-ink-muted">
        {lot.productName}, {packsText(lot)} on hand. Every change is kept in the lot's ledger with your name and reason.
      </p>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Change in packs" hint="Negative to take away, e.g. -1." error={errors.delta}>
          {(p) => <Input {...p} inputMode="numeric" value={delta} onChange={(e) => setDelta(e.target.value)} />}
        </Field>
        <Field label="Reason">
          {(p) => (
            <Select {...p} value={reason} onChange={(e) => setReason(e.target.value as typeof reason)}>
              <option value="discarded">Discarded (expired, damaged)</option>
              <option value="returned">Returned to the supplier</option>
              <option value="counted">Shelf count differs</option>
            </Select>
          )}
        </Field>
      </div>
      <Field label="Why" error={errors.note}>
        {(p) => <Input {...p} value={note} onChange={(e) => setNote(e.target.value)} />}
      </Field>
      {adjust.error && !Object.keys(errors).length && <Notice tone="danger">{adjust.error.message}</Notice>}
      <div className="flex justify-end gap-2">
        <Button onClick={onDone}>Cancel</Button>
        <Button type="submit" variant="primary" busy={adjust.isPending}>
          Save the change
        </Button>
      </div>
    </form>
  );
}
