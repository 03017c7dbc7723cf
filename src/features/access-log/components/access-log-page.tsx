import { useSearchParams } from 'react-router-dom';
import { ChevronLeft, ChevronRight, ChevronsLeft, Download, X } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button, buttonVariants } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Input, Select } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { formatDateTime } from '../../../lib/format';
import { accessLogCsvUrl, useAccessLog, useStaffNames, type AccessLogFilters } from '../api/access-log';

const ACTIONS = [
  ['', 'All actions'],
  ['auth.', 'Sign-ins and sign-outs'],
  ['patient.', 'Patient records'],
  ['photo.', 'Clinical photos'],
  ['consent', 'Consents'],
  ['compare', 'Comparisons'],
  ['showcase', 'Showcase'],
  ['treatment', 'Treatments'],
  ['user.', 'Users'],
  ['settings.', 'Settings'],
] as const;

const PAGE_SIZE = 50;

export function AccessLogPage() {
  const [params, setParams] = useSearchParams();
  const filters: AccessLogFilters = {
    userId: params.get('userId') || undefined,
    patientId: params.get('patientId') || undefined,
    action: params.get('action') || undefined,
    from: params.get('from') || undefined,
    to: params.get('to') || undefined,
    before: params.get('before') || undefined,
    after: params.get('after') || undefined,
    pageSize: PAGE_SIZE,
  };
  /** Sets one filter (back to the newest entries) or one page position (`before`/`after`, the other one cleared). */
  const set = (k: string, v: string | undefined) => {
    const next = new URLSearchParams(params);
    next.delete('before');
    next.delete('after');
    if (v) next.set(k, v);
    else next.delete(k);
    setParams(next, { replace: true });
  };
  const { data, isPending, error, isFetching } = useAccessLog(filters);
  const staff = useStaffNames();
  const onFirstPage = !filters.before && !filters.after;

  return (
    <>
      <PageHeader
        title="Access log"
        subtitle="Every sign-in, record view, photo view, consent and export. Entries cannot be changed or deleted."
        actions={
          <a className={buttonVariants({ variant: 'secondary' })} href={accessLogCsvUrl(filters)} download>
            <Download className="size-4" /> Export CSV
          </a>
        }
      />
      <Card className="mb-4 grid gap-3 p-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Staff member">
          {(p) => (
            <Select {...p} value={filters.userId ?? ''} onChange={(e) => set('userId', e.target.value)}>
              <option value="">Everyone</option>
              {staff.data?.map((u) => (
                <option key={u.id} value={u.id}>
                  {u.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Action">
          {(p) => (
            <Select {...p} value={filters.action ?? ''} onChange={(e) => set('action', e.target.value)}>
              {ACTIONS.map(([v, l]) => (
                <option key={v} value={v}>
                  {l}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="From">{(p) => <Input {...p} type="date" value={filters.from ?? ''} onChange={(e) => set('from', e.target.value)} />}</Field>
        <Field label="To">{(p) => <Input {...p} type="date" value={filters.to ?? ''} onChange={(e) => set('to', e.target.value)} />}</Field>
        {filters.patientId && (
          <div className="flex items-center gap-2 sm:col-span-2 lg:col-span-4">
            <Badge tone="accent">One patient: {data?.items[0]?.patientName ?? filters.patientId.slice(0, 8)}</Badge>
            <Button size="sm" variant="ghost" onClick={() => set('patientId', undefined)}>
              <X className="size-4" /> All patients
            </Button>
          </div>
        )}
      </Card>
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Loading the access log" />
      ) : !data?.items.length ? (
        <EmptyState title="No entries match these filters" />
      ) : (
        <Card className={isFetching ? 'opacity-80' : ''}>
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm">
              <thead className="border-b border-line text-xs tracking-wide text-ink-faint uppercase">
                <tr>
                  <th className="px-4 py-3 font-medium">When</th>
                  <th className="px-3 py-3 font-medium">Who</th>
                  <th className="px-3 py-3 font-medium">Action</th>
                  <th className="px-3 py-3 font-medium">Patient</th>
                  <th className="hidden px-3 py-3 font-medium lg:table-cell">From</th>
                </tr>
              </thead>
              <tbody>
                {data.items.map((e) => (
                  <tr key={e.id} className="border-b border-line last:border-0 align-top">
                    <td className="px-4 py-2.5 whitespace-nowrap tabular-nums text-ink-muted">{formatDateTime(e.at)}</td>
                    <td className="px-3 py-2.5">
                      <span className="font-medium">{e.actorName ?? (e.actorRole === 'handover' ? 'Patient (hand-over)' : '—')}</span>
                      <span className="block text-xs text-ink-faint">{e.actorRole}</span>
                    </td>
                    <td className="px-3 py-2.5">
                      <code className="rounded bg-paper-sunk px-1.5 py-0.5 text-xs">{e.action}</code>
                      {e.targetType && <span className="ml-1 text-xs text-ink-faint">{e.targetType}</span>}
                    </td>
                    <td className="px-3 py-2.5">
                      {e.patientId ? (
                        <button type="button" className="text-left hover:underline" onClick={() => set('patientId', e.patientId ?? undefined)}>
                          {e.patientName ?? 'Erased patient'} <span className="font-mono text-xs text-ink-faint">{e.patientCode}</span>
                        </button>
                      ) : (
                        '—'
                      )}
                    </td>
                    <td className="hidden px-3 py-2.5 font-mono text-xs text-ink-faint lg:table-cell">{e.ip}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <nav className="flex items-center justify-between border-t border-line px-4 py-2" aria-label="Pages">
            <div className="flex gap-1">
              <Button variant="ghost" size="sm" disabled={onFirstPage} onClick={() => set('before', undefined)}>
                <ChevronsLeft className="size-4" /> Newest
              </Button>
              <Button variant="ghost" size="sm" disabled={!data.newer} onClick={() => set('after', data.newer ?? undefined)}>
                <ChevronLeft className="size-4" /> Newer
              </Button>
            </div>
            <span className="text-sm text-ink-muted">
              {data.totalIsAtLeast ? `More than ${data.total.toLocaleString('en-GB')} entries` : `${data.total.toLocaleString('en-GB')} ${data.total === 1 ? 'entry' : 'entries'}`} · newest first
            </span>
            <Button variant="ghost" size="sm" disabled={!data.older} onClick={() => set('before', data.older ?? undefined)}>
              Older <ChevronRight className="size-4" />
            </Button>
          </nav>
        </Card>
      )}
    </>
  );
}
