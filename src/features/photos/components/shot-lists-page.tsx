import { useState } from 'react';
import { ArrowDown, ArrowUp, Plus, Trash2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Field, Input, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { useSaveShotList, useShotLists } from '../api/shot-lists';
import { ANCHOR_LABEL, type AnchorKind, type ShotListDto } from '../types';

interface Row {
  key: string;
  label: string;
  hint: string;
  anchorKind: AnchorKind;
  /** Saved views keep their key: photos refer to it. */
  saved: boolean;
}

const toRows = (l: ShotListDto | null): Row[] => (l ? l.views.map((v) => ({ key: v.key, label: v.label, hint: v.hint, anchorKind: v.anchorKind, saved: true })) : []);
const slug = (s: string) =>
  s
    .toLowerCase()
    .normalize('NFKD')
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 40);

function ShotListEditor({ list, onDone }: { list: ShotListDto | null; onDone: (id: string) => void }) {
  const [name, setName] = useState(list?.name ?? '');
  const [rows, setRows] = useState<Row[]>(() => toRows(list));
  const save = useSaveShotList(list?.id ?? null);
  const archive = useSaveShotList(list?.id ?? null);

  const move = (i: number, d: -1 | 1) =>
    setRows((rs) => {
      const next = [...rs];
      [next[i], next[i + d]] = [next[i + d], next[i]];
      return next;
    });
  const edit = (i: number, p: Partial<Row>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...p } : r)));

  const submit = () =>
    save.mutate(
      { name, views: rows.map((r) => ({ key: r.key, label: r.label, hint: r.hint, anchorKind: r.anchorKind })) },
      { onSuccess: (saved) => onDone(saved.id) },
    );

  return (
    <Card>
      <CardHeader
        title={list ? `Edit “${list.name}”` : 'New shot list'}
        action={list?.isDefault ? <Badge tone="accent">Used by new visits</Badge> : list?.archived ? <Badge tone="warn">Archived</Badge> : undefined}
      />
      <div className="space-y-4 p-5">
        <Field label="Name">{(p) => <Input {...p} value={name} onChange={(e) => setName(e.target.value)} maxLength={80} />}</Field>
        <ol className="space-y-3" aria-label="Views in order">
          {rows.map((r, i) => (
            <li key={i} className="rounded-lg border border-line p-3">
              <div className="grid gap-3 md:grid-cols-[1fr_1fr_1fr_auto]">
                <Field label="View name">{(p) => <Input {...p} value={r.label} maxLength={60} onChange={(e) => edit(i, { label: e.target.value, ...(r.saved ? {} : { key: slug(e.target.value) }) })} />}</Field>
                <Field label="Key" hint={r.saved ? 'Fixed: photos refer to it.' : 'Lowercase letters, digits, hyphens.'}>
                  {(p) => <Input {...p} value={r.key} readOnly={r.saved} maxLength={40} onChange={(e) => edit(i, { key: e.target.value })} className={r.saved ? 'bg-paper-sunk font-mono' : 'font-mono'} />}
                </Field>
                <Field label="Alignment">
                  {(p) => (
                    <Select {...p} value={r.anchorKind} onChange={(e) => edit(i, { anchorKind: e.target.value as AnchorKind })}>
                      {(Object.keys(ANCHOR_LABEL) as AnchorKind[]).map((k) => (
                        <option key={k} value={k}>
                          {ANCHOR_LABEL[k]}
                        </option>
                      ))}
                    </Select>
                  )}
                </Field>
                <div className="flex items-end gap-1">
                  <Button size="icon" variant="ghost" aria-label={`Move ${r.label || 'view'} up`} disabled={i === 0} onClick={() => move(i, -1)}>
                    <ArrowUp className="size-4" />
                  </Button>
                  <Button size="icon" variant="ghost" aria-label={`Move ${r.label || 'view'} down`} disabled={i === rows.length - 1} onClick={() => move(i, 1)}>
                    <ArrowDown className="size-4" />
                  </Button>
                  <Button size="icon" variant="ghost" aria-label={`Remove ${r.label || 'view'}`} onClick={() => setRows((rs) => rs.filter((_, j) => j !== i))}>
                    <Trash2 className="size-4" />
                  </Button>
                </div>
              </div>
              <Field label="Positioning hint" className="mt-3">
                {(p) => <Textarea {...p} rows={2} maxLength={600} value={r.hint} onChange={(e) => edit(i, { hint: e.target.value })} />}
              </Field>
            </li>
          ))}
        </ol>
        <Button onClick={() => setRows((rs) => [...rs, { key: '', label: '', hint: '', anchorKind: 'face', saved: false }])}>
          <Plus className="size-4" /> Add view
        </Button>
        {save.error && <Notice tone="danger">{save.error.message}</Notice>}
        {archive.error && <Notice tone="danger">{archive.error.message}</Notice>}
        <div className="flex flex-wrap justify-between gap-2 border-t border-line pt-4">
          {list && !list.isDefault ? (
            <Button variant="ghost" busy={archive.isPending} onClick={() => archive.mutate({ archived: !list.archived })}>
              {list.archived ? 'Restore' : 'Archive'}
            </Button>
          ) : (
            <span />
          )}
          <Button variant="primary" busy={save.isPending} disabled={!name.trim() || rows.length === 0} onClick={submit}>
            Save shot list
          </Button>
        </div>
      </div>
    </Card>
  );
}

/** Admin: the clinic's shot lists. Lists are never deleted; archived lists stay readable on the visits that used them. */
export function ShotListsPage() {
  const { data: lists, isPending, error } = useShotLists(true);
  const [selected, setSelected] = useState<string | 'new' | null>(null);
  if (isPending) return <Spinner label="Loading shot lists" />;
  if (error) return <Notice tone="danger">{error.message}</Notice>;
  const current = selected === 'new' ? null : (lists.find((l) => l.id === selected) ?? lists[0] ?? null);
  return (
    <>
      <PageHeader
        title="Shot lists"
        subtitle="The standard views photographed at a visit, in order, each with how to position the patient."
        actions={
          <Button variant="primary" onClick={() => setSelected('new')}>
            <Plus className="size-4" /> New shot list
          </Button>
        }
      />
      <div className="grid gap-5 lg:grid-cols-[16rem_1fr]">
        <nav aria-label="Shot lists">
          <ul className="space-y-1">
            {lists.map((l) => (
              <li key={l.id}>
                <button
                  type="button"
                  onClick={() => setSelected(l.id)}
                  aria-current={selected !== 'new' && current?.id === l.id ? 'true' : undefined}
                  className="flex min-h-11 w-full items-center justify-between gap-2 rounded-lg px-3 text-left hover:bg-paper-sunk aria-[current=true]:bg-paper-sunk aria-[current=true]:font-semibold"
                >
                  <span className="truncate">{l.name}</span>
                  <span className="text-sm text-ink-faint">{l.archived ? 'archived' : `${l.views.length} view${l.views.length === 1 ? '' : 's'}`}</span>
                </button>
              </li>
            ))}
          </ul>
        </nav>
        <ShotListEditor key={selected === 'new' ? 'new' : (current?.id ?? 'none')} list={current} onDone={(id) => setSelected(id)} />
      </div>
    </>
  );
}
