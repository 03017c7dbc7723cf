import { useMemo, useState } from 'react';
import { ArrowUp, Eye, Plus, Trash2 } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Field, Input, Select, Textarea } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { formatDate } from '../../../lib/format';
import { useCreateTemplate, useDeleteDraft, useNewTemplateVersion, usePublishTemplate, useRetireTemplate, useTemplates, useUpdateTemplate } from '../api/consent-templates';
import { CHANNEL_LABEL, KIND_LABEL, SHOWCASE_CHANNELS, type ConsentKind, type ConsentTemplate, type ShowcaseChannel, type TemplateQuestion } from '../types';
import { Markdown } from './markdown';

const STATUS_TONE = { draft: 'warn', published: 'done', retired: 'neutral' } as const;

/** Admin: the clinic's consent forms and questionnaires, their versions, publishing and retiring. */
export function ConsentFormsPage() {
  const templates = useTemplates();
  const [editing, setEditing] = useState<ConsentTemplate | null>(null);
  const [viewing, setViewing] = useState<ConsentTemplate | null>(null);
  const [creating, setCreating] = useState(false);
  const families = useMemo(() => {
    const map = new Map<string, ConsentTemplate[]>();
    for (const t of templates.data ?? []) map.set(t.familyId, [...(map.get(t.familyId) ?? []), t]);
    return [...map.values()].map((vs) => vs.sort((a, b) => b.version - a.version));
  }, [templates.data]);

  return (
    <>
      <PageHeader
        title="Consent forms"
        subtitle="Publishing fixes a version's text for good (its SHA-256 is recorded); to change a form, make a new version. Retired versions stay readable for the records signed on them."
        actions={
          <Button variant="primary" onClick={() => setCreating(true)}>
            <Plus className="size-4" aria-hidden /> New form
          </Button>
        }
      />
      <Notice className="mb-5">Forms are examples until your clinic has checked them against local law and professional guidance.</Notice>
      {templates.isPending ? (
        <Spinner label="Loading forms" />
      ) : templates.error ? (
        <Notice tone="danger">{templates.error.message}</Notice>
      ) : families.length === 0 ? (
        <EmptyState title="No forms yet" />
      ) : (
        <div className="space-y-3">
          {families.map((versions) => (
            <Family key={versions[0].familyId} versions={versions} onEdit={setEditing} onView={setViewing} />
          ))}
        </div>
      )}
      {creating && <NewFormDialog onClose={() => setCreating(false)} onCreated={(t) => (setCreating(false), setEditing(t))} />}
      {editing && <TemplateEditor template={editing} onClose={() => setEditing(null)} />}
      {viewing && <TemplateViewer template={viewing} onClose={() => setViewing(null)} />}
    </>
  );
}

function Family({ versions, onEdit, onView }: { versions: ConsentTemplate[]; onEdit: (t: ConsentTemplate) => void; onView: (t: ConsentTemplate) => void }) {
  const newVersion = useNewTemplateVersion();
  const publish = usePublishTemplate();
  const retire = useRetireTemplate();
  const remove = useDeleteDraft();
  const error = [newVersion.error, publish.error, retire.error, remove.error].find(Boolean);
  const hasDraft = versions.some((v) => v.status === 'draft');
  return (
    <Card className="px-5 py-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <p className="font-semibold">{versions[0].title}</p>
          <p className="text-sm text-ink-muted">{KIND_LABEL[versions[0].kind]}</p>
        </div>
        {!hasDraft && (
          <Button size="sm" busy={newVersion.isPending} onClick={() => newVersion.mutate(versions[0].id, { onSuccess: (t) => t && onEdit(t) })}>
            New version
          </Button>
        )}
      </div>
      <ul className="mt-3 divide-y divide-line">
        {versions.map((v) => (
          <li key={v.id} className="flex flex-wrap items-center gap-3 py-2">
            <span className="w-12 font-medium">v{v.version}</span>
            <Badge tone={STATUS_TONE[v.status]}>{v.status}</Badge>
            <span className="min-w-0 flex-1 truncate text-sm text-ink-muted">
              {v.status === 'draft' ? `edited ${formatDate(v.updatedAt)}` : v.status === 'published' ? `published ${formatDate(v.publishedAt!)}` : `retired ${formatDate(v.retiredAt!)}`}
              {v.sha256 && <span className="ml-2 font-mono text-xs text-ink-faint">{v.sha256.slice(0, 12)}…</span>}
            </span>
            <div className="flex gap-1">
              {v.status === 'draft' ? (
                <>
                  <Button size="sm" onClick={() => onEdit(v)}>Edit</Button>
                  <Button size="sm" variant="primary" busy={publish.isPending} onClick={() => window.confirm(`Publish version ${v.version}? Its text can no longer change afterwards.`) && publish.mutate(v.id)}>
                    Publish
                  </Button>
                  <Button size="sm" variant="ghost" aria-label="Delete draft" onClick={() => remove.mutate(v.id)}>
                    <Trash2 className="size-4" />
                  </Button>
                </>
              ) : (
                <>
                  <Button size="sm" variant="ghost" onClick={() => onView(v)}>
                    <Eye className="size-4" aria-hidden /> Read
                  </Button>
                  {v.status === 'published' && (
                    <Button size="sm" variant="danger" busy={retire.isPending} onClick={() => window.confirm('Retire this version? It can no longer be offered for signing.') && retire.mutate(v.id)}>
                      Retire
                    </Button>
                  )}
                </>
              )}
            </div>
          </li>
        ))}
      </ul>
      {error && <Notice tone="danger" className="mt-2">{error.message}</Notice>}
    </Card>
  );
}

function NewFormDialog({ onClose, onCreated }: { onClose: () => void; onCreated: (t: ConsentTemplate) => void }) {
  const create = useCreateTemplate();
  const [kind, setKind] = useState<ConsentKind>('treatment');
  const [title, setTitle] = useState('');
  const errors = create.error instanceof ApiError ? create.error.fieldErrors() : {};
  return (
    <Dialog open onClose={onClose} title="New form">
      <form
        className="space-y-4"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate({ kind, title, body: '', questions: [], channels: kind === 'showcase' ? [...SHOWCASE_CHANNELS] : [] }, { onSuccess: (t) => t && onCreated(t) });
        }}
      >
        <Field label="Kind">
          {(p) => (
            <Select {...p} value={kind} onChange={(e) => setKind(e.target.value as ConsentKind)}>
              {(Object.keys(KIND_LABEL) as ConsentKind[]).map((k) => (
                <option key={k} value={k}>{KIND_LABEL[k]}</option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Title" error={errors.title}>
          {(p) => <Input {...p} value={title} onChange={(e) => setTitle(e.target.value)} />}
        </Field>
        {create.error && !Object.keys(errors).length && <Notice tone="danger">{create.error.message}</Notice>}
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" busy={create.isPending}>Create draft</Button>
        </div>
      </form>
    </Dialog>
  );
}

const slug = (s: string) => s.toLowerCase().normalize('NFKD').replace(/[\u0300-\u036f]/g, '').replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 40) || 'question';

function TemplateEditor({ template, onClose }: { template: ConsentTemplate; onClose: () => void }) {
  const update = useUpdateTemplate(template.id);
  const [title, setTitle] = useState(template.title);
  const [body, setBody] = useState(template.body);
  const [questions, setQuestions] = useState<TemplateQuestion[]>(template.questions);
  const [channels, setChannels] = useState<ShowcaseChannel[]>(template.channels);
  const [preview, setPreview] = useState(false);
  const err = update.error instanceof ApiError ? update.error : null;
  const setQ = (i: number, patch: Partial<TemplateQuestion>) => setQuestions((qs) => qs.map((q, j) => (j === i ? { ...q, ...patch } : q)));

  return (
    <Dialog open onClose={onClose} title={`Edit draft: version ${template.version}`} className="w-[min(60rem,calc(100vw-2rem))]">
      <form
        className="space-y-5"
        onSubmit={(e) => {
          e.preventDefault();
          update.mutate({ title, body, questions, channels }, { onSuccess: onClose });
        }}
      >
        <Field label="Title">{(p) => <Input {...p} value={title} onChange={(e) => setTitle(e.target.value)} />}</Field>
        <div>
          <div className="mb-1.5 flex items-center justify-between">
            <span className="text-sm font-medium text-ink-muted">Text (Markdown: ## heading, **bold**, - list)</span>
            <Button size="sm" variant="ghost" onClick={() => setPreview(!preview)}>{preview ? 'Edit text' : 'Preview'}</Button>
          </div>
          {preview ? (
            <div className="max-h-[50dvh] overflow-y-auto rounded-lg border border-line bg-paper px-5">
              <Markdown source={body} />
            </div>
          ) : (
            <Textarea aria-label="Form text" rows={14} value={body} onChange={(e) => setBody(e.target.value)} className="font-mono text-sm" />
          )}
        </div>
        {template.kind === 'showcase' && (
          <fieldset>
            <legend className="mb-2 text-sm font-medium text-ink-muted">Channels offered (the patient ticks each one; none are pre-ticked)</legend>
            <div className="flex flex-wrap gap-3">
              {SHOWCASE_CHANNELS.map((c) => (
                <label key={c} className="flex items-center gap-2">
                  <input type="checkbox" checked={channels.includes(c)} onChange={(e) => setChannels((cs) => (e.target.checked ? SHOWCASE_CHANNELS.filter((x) => x === c || cs.includes(x)) : cs.filter((x) => x !== c)))} />
                  {CHANNEL_LABEL[c]}
                </label>
              ))}
            </div>
          </fieldset>
        )}
        <fieldset className="space-y-3">
          <legend className="mb-1 text-sm font-medium text-ink-muted">Questions</legend>
          {questions.map((q, i) => (
            <div key={i} className="grid gap-2 rounded-lg border border-line p-3 md:grid-cols-[1fr_10rem_8rem]">
              <Input aria-label="Question" value={q.label} onChange={(e) => setQ(i, { label: e.target.value, ...(template.questions.some((o) => o.id === q.id) ? {} : { id: slug(e.target.value) }) })} placeholder="Question" />
              <Select aria-label="Answer type" value={q.type} onChange={(e) => setQ(i, { type: e.target.value as TemplateQuestion['type'], options: e.target.value === 'choice' ? ['Option 1', 'Option 2'] : undefined, flagWhen: undefined })}>
                <option value="yes-no">Yes / no</option>
                <option value="choice">Choice</option>
                <option value="text">Text</option>
              </Select>
              <label className="flex items-center gap-2 text-sm">
                <input type="checkbox" checked={q.required} onChange={(e) => setQ(i, { required: e.target.checked })} /> Required
              </label>
              {q.type === 'choice' && (
                <Input aria-label="Options" className="md:col-span-2" value={(q.options ?? []).join(', ')} onChange={(e) => setQ(i, { options: e.target.value.split(',').map((s) => s.trim()).filter(Boolean) })} placeholder="Options, separated by commas" />
              )}
              {q.type !== 'text' && (
                <Input
                  aria-label="Flag for clinician review when the answer is"
                  className={cn(q.type === 'choice' ? '' : 'md:col-span-2')}
                  value={(q.flagWhen ?? []).join(', ')}
                  onChange={(e) => setQ(i, { flagWhen: e.target.value.split(',').map((s) => s.trim()).filter(Boolean) })}
                  placeholder={q.type === 'yes-no' ? 'Flag when: yes / no' : 'Flag when (options)'}
                />
              )}
              <div className="flex gap-1 md:col-start-3">
                <Button size="sm" variant="ghost" aria-label="Move up" disabled={i === 0} onClick={() => setQuestions((qs) => qs.map((x, j) => (j === i - 1 ? qs[i] : j === i ? qs[i - 1] : x)))}>
                  <ArrowUp className="size-4" />
                </Button>
                <Button size="sm" variant="ghost" aria-label="Remove question" onClick={() => setQuestions((qs) => qs.filter((_, j) => j !== i))}>
                  <Trash2 className="size-4" />
                </Button>
              </div>
            </div>
          ))}
          <Button size="sm" onClick={() => setQuestions((qs) => [...qs, { id: `question-${qs.length + 1}`, type: 'yes-no', label: '', required: true }])}>
            <Plus className="size-4" aria-hidden /> Add question
          </Button>
        </fieldset>
        {err && (
          <Notice tone="danger" title={err.message}>
            {Array.isArray(err.details) && (err.details as { path: string; message: string }[]).slice(1, 5).map((d) => <p key={d.path + d.message}>{d.path}: {d.message}</p>)}
          </Notice>
        )}
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" busy={update.isPending}>Save draft</Button>
        </div>
      </form>
    </Dialog>
  );
}

function TemplateViewer({ template, onClose }: { template: ConsentTemplate; onClose: () => void }) {
  return (
    <Dialog open onClose={onClose} title={`${template.title} · v${template.version}`} className="w-[min(56rem,calc(100vw-2rem))]">
      <p className="break-all font-mono text-xs text-ink-faint">SHA-256 {template.sha256}</p>
      <Markdown source={template.body} />
      {template.channels.length > 0 && <p className="mt-4 text-sm">Channels: {template.channels.map((c) => CHANNEL_LABEL[c]).join(', ')}</p>}
      {template.questions.length > 0 && (
        <ol className="mt-4 list-decimal space-y-1 pl-6 text-sm">
          {template.questions.map((q) => (
            <li key={q.id}>
              {q.label} <span className="text-ink-faint">({q.type}{q.required ? ', required' : ''}{q.flagWhen?.length ? `; flag when ${q.flagWhen.join(' or ')}` : ''})</span>
            </li>
          ))}
        </ol>
      )}
    </Dialog>
  );
}
