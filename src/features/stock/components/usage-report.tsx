import { useMemo, useState } from 'react';
import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from 'recharts';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { useUsage } from '../api/stock';
import type { UsageRow } from '../types';

const monthLabel = (m: string) => new Date(`${m}-15T12:00:00Z`).toLocaleDateString('en-GB', { month: 'short', year: 'numeric', timeZone: 'UTC' });
const thisMonth = () => new Date().toISOString().slice(0, 7);
const monthsBack = (m: string, n: number) => {
  const [y, mm] = m.split('-').map(Number);
  return new Date(Date.UTC(y, mm - 1 - n, 1)).toISOString().slice(0, 7);
};
const unitOf = (r: Pick<UsageRow, 'unit' | 'unitLabel'>) => (r.unit === 'U' ? (r.unitLabel ?? 'U') : 'mL');
const fmt = (n: number) => String(Math.round(n * 100) / 100);

/** Series colours from the app's palette (SVG attributes cannot read CSS variables themselves). */
function palette(): string[] {
  const css = getComputedStyle(document.documentElement);
  const get = (name: string, fallback: string) => css.getPropertyValue(name).trim() || fallback;
  return [get('--color-accent', '#b3361f'), get('--color-done', '#2f6f6a'), get('--color-warn', '#a8680c'), get('--color-ink-muted', '#5f584f'), get('--color-line-strong', '#c4b9a6')];
}

/**
 * Monthly usage per product and practitioner: a table, and one chart per unit. Products in units are drawn side by
 * side, never stacked: units of one product are not another's (FACTS 28).
 */
export function UsageReportPage() {
  const [to, setTo] = useState(thisMonth());
  const [from, setFrom] = useState(monthsBack(thisMonth(), 5));
  const { data, isPending, error } = useUsage(from, to);
  const colours = useMemo(palette, []);

  const charts = useMemo(() => {
    if (!data) return [];
    const groups = new Map<string, { unit: string; stacked: boolean; products: string[] }>();
    for (const r of data.rows) {
      const key = r.unit === 'mL' ? 'mL' : `U:${r.productId}`;
      const g = groups.get(key) ?? { unit: unitOf(r), stacked: r.unit === 'mL', products: [] };
      if (!g.products.includes(r.productName)) g.products.push(r.productName);
      groups.set(key, g);
    }
    return [...groups.values()].map((g) => ({
      ...g,
      title: g.unit === 'mL' ? 'Filler given (mL)' : `${g.products[0]} (${g.unit})`,
      points: data.months.map((m) => ({
        month: monthLabel(m),
        ...Object.fromEntries(g.products.map((p) => [p, data.rows.filter((r) => r.month === m && r.productName === p).reduce((n, r) => n + r.amount, 0)])),
      })),
    }));
  }, [data]);

  return (
    <>
      <PageHeader
        title="Monthly usage"
        subtitle="What each practitioner gave of each product, by treatment day, and the packs taken from stock."
        actions={
          <div className="flex flex-wrap items-end gap-2">
            <Field label="From">{(p) => <Input {...p} type="month" value={from} max={to} onChange={(e) => e.target.value && setFrom(e.target.value)} className="w-44" />}</Field>
            <Field label="To">{(p) => <Input {...p} type="month" value={to} min={from} onChange={(e) => e.target.value && setTo(e.target.value)} className="w-44" />}</Field>
          </div>
        }
      />
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Adding up the months" />
      ) : !data?.rows.length ? (
        <EmptyState title="No treatments recorded in these months" />
      ) : (
        <div className="space-y-4">
          <div className="grid gap-4 lg:grid-cols-2">
            {charts.map((c) => (
              <Card key={c.title}>
                <CardHeader title={c.title} />
                <div className="h-64 p-3" role="img" aria-label={`${c.title} per month`}>
                  <ResponsiveContainer width="100%" height="100%">
                    <BarChart data={c.points} margin={{ top: 8, right: 8, bottom: 0, left: -12 }}>
                      <CartesianGrid strokeDasharray="3 3" vertical={false} />
                      <XAxis dataKey="month" tick={{ fontSize: 12 }} />
                      <YAxis tick={{ fontSize: 12 }} allowDecimals />
                      <Tooltip formatter={(v) => `${fmt(Number(v))} ${c.unit}`} />
                      <Legend wrapperStyle={{ fontSize: 12 }} />
                      {c.products.map((p, i) => (
                        <Bar key={p} dataKey={p} stackId={c.stacked ? 'a' : undefined} fill={colours[i % colours.length]} isAnimationActive={false} />
                      ))}
                    </BarChart>
                  </ResponsiveContainer>
                </div>
              </Card>
            ))}
          </div>
          <Card>
            <table className="w-full text-[15px]" aria-label="Usage per month, product and practitioner">
              <thead>
                <tr className="border-b border-line text-left text-sm text-ink-muted">
                  <th className="px-5 py-2 font-medium">Month</th>
                  <th className="px-3 py-2 font-medium">Product</th>
                  <th className="px-3 py-2 font-medium">Practitioner</th>
                  <th className="px-3 py-2 text-right font-medium">Given</th>
                  <th className="px-3 py-2 text-right font-medium">Treatments</th>
                  <th className="px-5 py-2 text-right font-medium">Packs</th>
                </tr>
              </thead>
              <tbody>
                {data.rows.map((r) => (
                  <tr key={`${r.month}-${r.productId}-${r.practitionerId}`} className="border-b border-line last:border-0">
                    <td className="px-5 py-2">{monthLabel(r.month)}</td>
                    <td className="px-3 py-2">{r.productName}</td>
                    <td className="px-3 py-2">{r.practitionerName}</td>
                    <td className="px-3 py-2 text-right font-mono tabular-nums">
                      {fmt(r.amount)} {unitOf(r)}
                    </td>
                    <td className="px-3 py-2 text-right tabular-nums">{r.treatments}</td>
                    <td className="px-5 py-2 text-right tabular-nums">{r.packs}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </Card>
        </div>
      )}
    </>
  );
}
