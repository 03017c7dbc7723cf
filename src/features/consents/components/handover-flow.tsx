import { useEffect, useRef, useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { CheckCircle2, ChevronRight, Lock, ShieldCheck } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Field, Input } from '../../../components/ui/field';
import { Logo } from '../../../components/ui/logo';
import { Notice } from '../../../components/ui/notice';
import { Spinner } from '../../../components/ui/page';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { markShown, useClaimHandover, useForgetStaffData, useCurrentHandover, useDeclineForm, useSignForm } from '../api/handovers';
import { CHANNEL_LABEL, KIND_LABEL, type Crop, type CurrentHandover, type HandoverForm, type ShowcaseChannel, type TemplateQuestion } from '../types';
import { Markdown } from './markdown';
import { SignaturePad, type SignaturePadHandle } from './signature-pad';

/**
 * The patient's side of a hand-over: one form at a time, full screen, no way into the rest of the app.
 * The server enforces the lock (this session reaches only the hand-over routes); this screen keeps the
 * browser's back button and stray links from leading anywhere.
 */
export function HandoverFlowPage() {
  useNoWayOut();
  useForgetStaffData();
  const link = useClaimFromLink();
  const current = useCurrentHandover(!link.pending);
  const [started, setStarted] = useState(false);

  if (link.pending || current.isPending) return <Frame><Spinner label="Opening your forms" /></Frame>;
  if (current.error) {
    const e = current.error;
    if (e instanceof ApiError && e.code === 'HANDOVER_ENDED') return <Ended />;
    if (e instanceof ApiError && (e.status === 401 || e.status === 403)) return <ClaimScreen linkError={link.error} />;
    return <Frame><Notice tone="danger">{e.message}</Notice></Frame>;
  }
  const h = current.data;
  const next = h.forms.find((f) => f.state === 'to-do' || f.state === 'unavailable');
  if (h.completed || !next) return <Finished h={h} />;
  if (!started && !h.forms.some((f) => f.state !== 'to-do')) return <Welcome h={h} onStart={() => setStarted(true)} />;
  return <FormStep key={next.templateId} h={h} form={next} />;
}

/** Keeps the device on this page: the back button lands here again. */
function useNoWayOut() {
  useEffect(() => {
    window.history.pushState(null, '', window.location.href);
    const stay = () => window.history.pushState(null, '', window.location.href);
    window.addEventListener('popstate', stay);
    return () => window.removeEventListener('popstate', stay);
  }, []);
}

/** A one-time link ends in `#claim=<token>`: join the hand-over with it, then drop it from the address bar. */
function useClaimFromLink() {
  const claim = useClaimHandover();
  const [token] = useState(() => /[#&]claim=([A-Za-z0-9_-]+)/.exec(window.location.hash)?.[1] ?? null);
  const sent = useRef(false);
  useEffect(() => {
    if (!token || sent.current) return;
    sent.current = true;
    window.history.replaceState(null, '', window.location.pathname);
    claim.mutate({ token });
  }, [token, claim]);
  return { pending: Boolean(token) && !claim.isSuccess && !claim.isError, error: claim.error instanceof ApiError ? claim.error.message : null };
}

function Frame({ children, header }: { children: React.ReactNode; header?: React.ReactNode }) {
  return (
    <div className="min-h-dvh bg-paper">
      <header className="sticky top-0 z-20 border-b border-line bg-paper/95 backdrop-blur">
        <div className="mx-auto flex min-h-16 max-w-3xl items-center gap-3 px-5 py-2">
          <Logo className="size-8" />
          <div className="min-w-0 flex-1">{header}</div>
          <Lock className="size-4 text-ink-faint" aria-label="Locked to your forms" />
        </div>
      </header>
      <main className="mx-auto max-w-3xl px-5 py-6">{children}</main>
    </div>
  );
}

function StaffSignIn({ label = 'Clinic staff: sign in' }: { label?: string }) {
  const navigate = useNavigate();
  return (
    <Button variant="secondary" onClick={() => navigate('/sign-in', { replace: true })}>
      <ShieldCheck className="size-4" aria-hidden /> {label}
    </Button>
  );
}

function Welcome({ h, onStart }: { h: CurrentHandover; onStart: () => void }) {
  return (
    <Frame header={<p className="font-semibold">{h.clinicName}</p>}>
      <h1 className="text-3xl font-semibold">Hello {h.patient.firstName}</h1>
      <p className="mt-3 text-lg text-ink-muted">
        {h.clinicName} has asked you to read and sign {h.forms.length === 1 ? 'one form' : `${h.forms.length} forms`}. Take your time, and ask the team if anything is unclear.
      </p>
      <ol className="mt-6 space-y-2">
        {h.forms.map((f, i) => (
          <li key={f.templateId} className="flex items-center gap-3 rounded-xl border border-line bg-paper-raised px-4 py-3">
            <span className="grid size-8 place-items-center rounded-full bg-paper-sunk font-semibold">{i + 1}</span>
            <span className="flex-1">{f.title}</span>
            {f.optional && <span className="text-sm text-ink-faint">optional</span>}
          </li>
        ))}
      </ol>
      <Button
        variant="primary"
        size="lg"
        className="mt-8 w-full"
        onClick={() => {
          document.documentElement.requestFullscreen?.().catch(() => undefined);
          onStart();
        }}
      >
        Start <ChevronRight className="size-5" aria-hidden />
      </Button>
    </Frame>
  );
}

function Progress({ h, form }: { h: CurrentHandover; form: HandoverForm }) {
  const index = h.forms.findIndex((f) => f.templateId === form.templateId);
  return (
    <div className="flex items-center gap-3">
      <p className="text-sm font-medium text-ink-muted">
        Form {index + 1} of {h.forms.length}
      </p>
      <div className="flex gap-1.5" aria-hidden>
        {h.forms.map((f, i) => (
          <span key={f.templateId} className={cn('h-2 w-6 rounded-full', f.state === 'signed' || f.state === 'declined' ? 'bg-done' : i === index ? 'bg-accent' : 'bg-line')} />
        ))}
      </div>
    </div>
  );
}

type Errors = Partial<Record<string, string>>;

function FormStep({ h, form }: { h: CurrentHandover; form: HandoverForm }) {
  const sign = useSignForm();
  const decline = useDeclineForm();
  const pad = useRef<SignaturePadHandle>(null);
  const [answers, setAnswers] = useState<Record<string, string>>({});
  const [channels, setChannels] = useState<ShowcaseChannel[]>([]);
  const [crop, setCrop] = useState<Crop | null>(null);
  const [name, setName] = useState('');
  const [errors, setErrors] = useState<Errors>({});
  const top = useRef<HTMLHeadingElement>(null);
  const clearError = (key: string) => setErrors((e) => (key in e ? Object.fromEntries(Object.entries(e).filter(([k]) => k !== key)) : e));

  useEffect(() => {
    window.scrollTo(0, 0);
    top.current?.focus();
    markShown(form.templateId).catch(() => undefined);
  }, [form.templateId]);

  if (form.state === 'unavailable') {
    return (
      <Frame header={<Progress h={h} form={form} />}>
        <Notice tone="warn" title="This form is no longer offered">
          The clinic has replaced this form. Please hand the tablet back to the clinic.
        </Notice>
        <div className="mt-6">
          <StaffSignIn />
        </div>
      </Frame>
    );
  }

  const showcase = form.kind === 'showcase';
  const check = (): Errors => {
    const e: Errors = {};
    for (const q of form.questions) if (q.required && !answers[q.id]?.trim()) e[`q:${q.id}`] = 'Please answer this question.';
    if (showcase && channels.length === 0) e.channels = 'Tick at least one place, or choose “No thanks” below.';
    if (showcase && !crop) e.crop = 'Choose one.';
    if (name.trim().length < 2) e.name = 'Type your full name.';
    if (!pad.current?.toPng()) e.signature = 'Please sign in the box.';
    return e;
  };

  const submit = () => {
    const e = check();
    setErrors(e);
    if (Object.keys(e).length) {
      document.querySelector('[aria-invalid="true"], [data-invalid="true"]')?.scrollIntoView({ block: 'center', behavior: 'smooth' });
      return;
    }
    sign.mutate(
      { templateId: form.templateId, answers, channels, crop: crop ?? undefined, signerName: name.trim(), signature: pad.current!.toPng()! },
      {
        onError: (err) => {
          if (!(err instanceof ApiError)) return;
          const next: Errors = {};
          if (err.code === 'ANSWERS_INVALID' && Array.isArray(err.details)) for (const d of err.details as { question?: string; message: string }[]) if (d.question) next[`q:${d.question}`] = d.message;
          if (err.code.startsWith('SIGNATURE_')) next.signature = err.message;
          if (err.code === 'CHANNELS_REQUIRED' || err.code === 'CHANNELS_INVALID') next.channels = err.message;
          if (err.code === 'CROP_REQUIRED') next.crop = err.message;
          setErrors(next);
        },
      },
    );
  };

  const serverError = sign.error instanceof ApiError ? sign.error : decline.error instanceof ApiError ? decline.error : null;
  const ended = serverError?.code === 'HANDOVER_ENDED' || serverError?.code === 'TEMPLATE_RETIRED';

  return (
    <Frame header={<Progress h={h} form={form} />}>
      <p className="text-sm font-medium uppercase tracking-wide text-accent">{KIND_LABEL[form.kind]}</p>
      <h1 ref={top} tabIndex={-1} className="mt-1 text-3xl font-semibold outline-none">
        {form.title}
      </h1>
      <p className="mt-1 text-sm text-ink-faint">Version {form.version}</p>
      <article className="mt-4 rounded-2xl border border-line bg-paper-raised px-5 py-2 sm:px-7">
        <Markdown source={form.body} />
      </article>

      {form.questions.length > 0 && (
        <section className="mt-8 space-y-5" aria-label="Questions">
          <h2 className="text-xl font-semibold">{form.kind === 'screening' ? 'Your answers' : 'Your choices'}</h2>
          {form.questions.map((q) => (
            <Question key={q.id} q={q} value={answers[q.id] ?? ''} error={errors[`q:${q.id}`]} onChange={(v) => {
                setAnswers((a) => ({ ...a, [q.id]: v }));
                clearError(`q:${q.id}`);
              }} />
          ))}
        </section>
      )}

      {showcase && (
        <section className="mt-8 space-y-6" aria-label="Where and how your results may be shown">
          <fieldset data-invalid={Boolean(errors.channels) || undefined}>
            <legend className="text-xl font-semibold">Where may we show your results?</legend>
            <p className="mt-1 text-ink-muted">Tick each place you agree to. Nothing is ticked for you.</p>
            <div className="mt-3 grid gap-2 sm:grid-cols-2">
              {form.channels.map((c) => (
                <label key={c} className={cn('flex min-h-14 cursor-pointer items-center gap-3 rounded-xl border bg-paper-raised px-4', channels.includes(c) ? 'border-ink' : 'border-line-strong')}>
                  <input
                    type="checkbox"
                    className="size-5 accent-[var(--color-ink)]"
                    checked={channels.includes(c)}
                    onChange={(e) => {
                      setChannels((cs) => (e.target.checked ? [...cs, c] : cs.filter((x) => x !== c)));
                      clearError('channels');
                    }}
                  />
                  <span className="text-[17px]">{CHANNEL_LABEL[c]}</span>
                </label>
              ))}
            </div>
            {errors.channels && <p className="mt-2 text-danger" role="alert">{errors.channels}</p>}
          </fieldset>
          <fieldset data-invalid={Boolean(errors.crop) || undefined}>
            <legend className="text-xl font-semibold">How much of your face may be shown?</legend>
            <div className="mt-3 grid gap-2 sm:grid-cols-2">
              {(
                [
                  ['lips-only', 'Only a close crop of my lips'],
                  ['face', 'My whole face'],
                ] as const
              ).map(([value, label]) => (
                <label key={value} className={cn('flex min-h-14 cursor-pointer items-center gap-3 rounded-xl border bg-paper-raised px-4', crop === value ? 'border-ink' : 'border-line-strong')}>
                  <input type="radio" name="crop" className="size-5 accent-[var(--color-ink)]" checked={crop === value} onChange={() => (setCrop(value), clearError('crop'))} />
                  <span className="text-[17px]">{label}</span>
                </label>
              ))}
            </div>
            {errors.crop && <p className="mt-2 text-danger" role="alert">{errors.crop}</p>}
          </fieldset>
        </section>
      )}

      <section className="mt-8 space-y-5 rounded-2xl border border-line bg-paper-raised p-5" aria-label="Sign">
        <h2 className="text-xl font-semibold">Sign</h2>
        <Field label="Your full name" error={errors.name}>
          {(p) => <Input {...p} value={name} onChange={(e) => (setName(e.target.value), clearError('name'))} autoComplete="off" autoCapitalize="words" className="min-h-12 text-lg" />}
        </Field>
        <div data-invalid={Boolean(errors.signature) || undefined}>
          <p className="mb-1.5 text-sm font-medium text-ink-muted">Your signature</p>
          <SignaturePad ref={pad} label="Signature pad" invalid={Boolean(errors.signature)} onChange={(empty) => !empty && clearError('signature')} />
          {errors.signature && <p className="mt-1 text-sm text-danger" role="alert">{errors.signature}</p>}
        </div>
        <p className="text-sm text-ink-muted">By signing you confirm that you have read this form and that the answers and choices above are yours. You will receive a copy by e-mail.</p>
        {serverError && !Object.keys(errors).length && <Notice tone="danger">{serverError.message}</Notice>}
        {ended ? (
          <StaffSignIn label="Hand back to the clinic" />
        ) : (
          <div className="flex flex-col gap-3 sm:flex-row">
            <Button variant="primary" size="lg" className="flex-1" onClick={submit} busy={sign.isPending}>
              Sign this form
            </Button>
            {form.optional && (
              <Button variant="secondary" size="lg" onClick={() => decline.mutate(form.templateId)} busy={decline.isPending}>
                No thanks, skip this form
              </Button>
            )}
          </div>
        )}
      </section>
    </Frame>
  );
}

function Question({ q, value, error, onChange }: { q: TemplateQuestion; value: string; error?: string; onChange: (v: string) => void }) {
  const choices = q.type === 'yes-no' ? [['yes', 'Yes'], ['no', 'No']] : q.type === 'choice' ? (q.options ?? []).map((o) => [o, o]) : null;
  return (
    <fieldset className="rounded-xl border border-line bg-paper-raised p-4" data-invalid={Boolean(error) || undefined}>
      <legend className="sr-only">{q.label}</legend>
      <p className="text-[17px] font-medium" aria-hidden>
        {q.label}
        {!q.required && <span className="ml-2 text-sm font-normal text-ink-faint">optional</span>}
      </p>
      {q.help && <p className="mt-1 text-sm text-ink-muted">{q.help}</p>}
      {choices ? (
        <div className={cn('mt-3 grid gap-2', q.type === 'yes-no' ? 'grid-cols-2' : 'sm:grid-cols-3')} role="radiogroup" aria-label={q.label}>
          {choices.map(([v, label]) => (
            <button
              key={v}
              type="button"
              role="radio"
              aria-checked={value === v}
              onClick={() => onChange(v)}
              className={cn('min-h-12 rounded-lg border px-4 text-[17px] font-medium', value === v ? 'border-ink bg-ink text-paper' : 'border-line-strong bg-paper hover:bg-paper-sunk')}
            >
              {label}
            </button>
          ))}
        </div>
      ) : (
        <textarea
          aria-label={q.label}
          className="mt-3 block min-h-20 w-full rounded-lg border border-line-strong bg-paper px-3 py-2 text-[17px]"
          value={value}
          maxLength={2000}
          onChange={(e) => onChange(e.target.value)}
        />
      )}
      {error && <p className="mt-2 text-danger" role="alert">{error}</p>}
    </fieldset>
  );
}

function Finished({ h }: { h: CurrentHandover }) {
  const signed = h.forms.filter((f) => f.state === 'signed').length;
  return (
    <Frame header={<p className="font-semibold">{h.clinicName}</p>}>
      <div className="py-10 text-center">
        <CheckCircle2 className="mx-auto size-16 text-done" aria-hidden />
        <h1 className="mt-4 text-3xl font-semibold">Thank you, {h.patient.firstName}</h1>
        <p className="mt-3 text-lg text-ink-muted">
          {signed === 1 ? 'Your form is signed.' : `Your ${signed} forms are signed.`} A copy is on its way to your e-mail.
        </p>
        <p className="mt-8 text-2xl font-semibold">Please hand the tablet back to the clinic.</p>
        <div className="mt-10">
          <StaffSignIn />
        </div>
      </div>
    </Frame>
  );
}

function Ended() {
  return (
    <Frame>
      <div className="py-10 text-center">
        <h1 className="text-2xl font-semibold">This hand-over has ended</h1>
        <p className="mt-3 text-lg text-ink-muted">Please hand the device back to the clinic.</p>
        <div className="mt-8">
          <StaffSignIn />
        </div>
      </div>
    </Frame>
  );
}

/** On a second device: the patient types the code the clinic shows them. */
function ClaimScreen({ linkError }: { linkError: string | null }) {
  const claim = useClaimHandover();
  const [code, setCode] = useState('');
  const error = claim.error instanceof ApiError ? claim.error.message : claim.error ? 'Could not reach the clinic. Check the connection.' : linkError;
  return (
    <Frame header={<p className="font-semibold">Sign your forms</p>}>
      <form
        className="mx-auto max-w-md space-y-5 rounded-2xl border border-line bg-paper-raised p-6"
        onSubmit={(e) => {
          e.preventDefault();
          if (code.trim()) claim.mutate({ code: code.trim() });
        }}
      >
        <h1 className="text-2xl font-semibold">Enter your code</h1>
        <p className="text-ink-muted">The clinic team will give you a short code to open your forms on this device.</p>
        {error && <Notice tone="danger">{error}</Notice>}
        <Field label="Code">
          {(p) => (
            <Input {...p} value={code} onChange={(e) => setCode(e.target.value.toUpperCase())} autoComplete="one-time-code" autoCapitalize="characters" placeholder="ABCD-2345" className="min-h-12 text-center font-mono text-2xl tracking-widest" />
          )}
        </Field>
        <Button type="submit" variant="primary" size="lg" className="w-full" busy={claim.isPending}>
          Open my forms
        </Button>
      </form>
    </Frame>
  );
}
