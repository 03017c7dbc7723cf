import { useState } from 'react';
import { cn } from '../../../lib/cn';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { useShowcaseQueue } from '../api/showcase';
import type { ShowcaseState } from '../types';
import { RequestCard } from './request-card';

const TABS: { key: ShowcaseState | 'all'; label: string }[] = [
  { key: 'requested', label: 'Awaiting clearance' },
  { key: 'cleared', label: 'Cleared' },
  { key: 'withdrawn', label: 'Withdrawn' },
  { key: 'declined', label: 'Declined' },
  { key: 'all', label: 'All' },
];

/** The admin's queue of showcase requests. Nothing reaches marketing without a decision here. */
export function ClearanceQueue() {
  const [tab, setTab] = useState<ShowcaseState | 'all'>('requested');
  const { data, isPending } = useShowcaseQueue(tab);
  return (
    <>
      <PageHeader title="Showcase clearance" subtitle="Results nominated for marketing. Each is checked against the patient's signed showcase consent; withdrawals stop every use at once." />
      <nav className="mb-4 flex gap-1 overflow-x-auto border-b border-line" aria-label="Request states">
        {TABS.map((t) => (
          <button
            key={t.key}
            type="button"
            onClick={() => setTab(t.key)}
            aria-current={tab === t.key ? 'page' : undefined}
            className={cn('-mb-px min-h-11 shrink-0 border-b-2 border-transparent px-4 font-medium text-ink-muted hover:text-ink', tab === t.key && 'border-accent text-ink')}
          >
            {t.label}
          </button>
        ))}
      </nav>
      {isPending ? <Spinner label="Loading requests" /> : data?.length ? <div className="space-y-3">{data.map((r) => <RequestCard key={r.id} request={r} admin />)}</div> : <EmptyState title="Nothing here" />}
    </>
  );
}
