import { useRef, useState, type DragEvent } from 'react';
import { FileCheck2, FileUp, ShieldAlert, ShieldCheck } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Field, Input } from '../../../components/ui/field';
import { Logo } from '../../../components/ui/logo';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { cn } from '../../../lib/cn';
import { useSigningCertificate, useVerify, type VerifyAnswer } from '../api/verify';

const longDate = (day: string) => new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', { timeZone: 'UTC', day: 'numeric', month: 'long', year: 'numeric' });
/** "AB:CD:…" in groups, as certificate viewers print a fingerprint. */
const fingerprintText = (hex: string) => hex.toUpperCase().match(/.{2}/g)!.join(':');

/**
 * The public verify page (no sign-in): anyone holding a consent PDF from the clinic, or its SHA-256, learns whether
 * it is a signed consent record of the clinic, unchanged, and its date, form and state. Nothing else.
 */
export function VerifyPage() {
  const verify = useVerify();
  const certificate = useSigningCertificate();
  const input = useRef<HTMLInputElement>(null);
  const [dragging, setDragging] = useState(false);
  const [fileName, setFileName] = useState<string | null>(null);
  const [hash, setHash] = useState('');

  const checkFile = (file: File | undefined) => {
    if (!file) return;
    setFileName(file.name);
    verify.mutate({ file });
  };
  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setDragging(false);
    checkFile(e.dataTransfer.files[0]);
  };
  const error = verify.error instanceof ApiError ? verify.error : null;
  const hashError = error?.code === 'VALIDATION_FAILED' ? error.message.replace(/^sha256: /, '') : undefined;
  const clinic = certificate.data?.commonName;

  return (
    <main className="mx-auto w-full max-w-2xl px-4 py-8 sm:py-12">
      <div className="mb-6 flex items-center gap-3">
        <Logo className="size-9" />
        <p className="font-display text-xl font-semibold">Twinframe</p>
      </div>
      <h1 className="text-3xl font-semibold leading-tight">Check a consent document</h1>
      <p className="mt-2 text-ink-muted">
        Is this PDF a signed consent record {clinic ? `of ${clinic}` : 'of the clinic'}, exactly as it was signed? Choose the file, or type the SHA-256 stated in the e-mail it came with.
      </p>

      <div className="mt-6 space-y-5">
        <div
          onDragOver={(e) => {
            e.preventDefault();
            setDragging(true);
          }}
          onDragLeave={() => setDragging(false)}
          onDrop={onDrop}
          className={cn(
            'flex flex-col items-center gap-3 rounded-2xl border-2 border-dashed px-5 py-8 text-center transition-colors',
            dragging ? 'border-accent bg-accent-soft/50' : 'border-line-strong bg-paper-raised',
          )}
        >
          <FileUp className="size-8 text-ink-muted" aria-hidden />
          <p className="text-ink-muted">
            <span className="hidden sm:inline">Drop the PDF here, or </span>
            <span className="sm:hidden">Choose the PDF you received.</span>
          </p>
          <Button variant="primary" size="lg" onClick={() => input.current?.click()} busy={verify.isPending && Boolean(fileName)}>
            <FileCheck2 className="size-5" aria-hidden /> Choose a PDF
          </Button>
          <input
            ref={input}
            type="file"
            accept="application/pdf,.pdf"
            className="sr-only"
            aria-label="PDF to check"
            onChange={(e) => {
              checkFile(e.target.files?.[0]);
              e.target.value = '';
            }}
          />
          {fileName && <p className="max-w-full truncate text-sm text-ink-faint">{fileName}</p>}
        </div>

        <form
          className="flex flex-col gap-3 sm:flex-row sm:items-end"
          onSubmit={(e) => {
            e.preventDefault();
            setFileName(null);
            verify.mutate({ sha256: hash });
          }}
        >
          <Field label="Or type its SHA-256" hint="64 characters, 0–9 and a–f; spaces are ignored." error={hashError} className="min-w-0 flex-1">
            {(p) => <Input {...p} value={hash} onChange={(e) => setHash(e.target.value)} autoComplete="off" spellCheck={false} className="font-mono text-sm" placeholder="e.g. 3f9a…" />}
          </Field>
          <Button type="submit" disabled={!hash.trim()} busy={verify.isPending && !fileName} className="sm:mb-7">
            Check
          </Button>
        </form>

        <div aria-live="polite">
          {verify.data && <Answer answer={verify.data} />}
          {error && !hashError && <Notice tone={error.status === 429 ? 'warn' : 'danger'}>{error.message}</Notice>}
          {verify.error && !error && <Notice tone="danger">Could not reach the clinic's server. Check the connection and try again.</Notice>}
        </div>
      </div>

      <section className="mt-10 space-y-3 text-sm leading-relaxed text-ink-muted">
        <h2 className="text-lg font-semibold text-ink">What this checks</h2>
        <p>
          The clinic keeps the SHA-256 fingerprint of every signed consent PDF it sends. A file is recognised only if it is byte for byte the one the clinic signed; any change, even of a
          single character, makes it unrecognisable. Answers say nothing about the person who signed.
        </p>
        <p>
          Each PDF also carries the clinic's digital signature, which PDF readers can show. {clinic ? `It is signed by “${clinic}”` : 'It is signed by the clinic'}
          {certificate.data && (
            <>
              {' '}with the certificate whose SHA-256 fingerprint is <span className="break-all font-mono text-xs text-ink">{fingerprintText(certificate.data.fingerprint)}</span>
            </>
          )}
          .
        </p>
        <p>The file is checked on the clinic's server and not kept. Checks are logged and limited per connection.</p>
      </section>
    </main>
  );
}

function Answer({ answer }: { answer: VerifyAnswer }) {
  if (answer.result === 'not-a-record') {
    return (
      <Card className="border-danger/40 px-5 py-4" data-testid="verify-answer">
        <p className="flex items-center gap-2 text-lg font-semibold text-danger">
          <ShieldAlert className="size-6 shrink-0" aria-hidden /> Not a record of this clinic, or altered
        </p>
        <p className="mt-2 text-ink-muted">
          This file is not a signed consent record the clinic holds, or it was changed after signing. If you expected it to be one, contact the clinic and keep the file as it is.
        </p>
        <p className="mt-3 break-all font-mono text-[11px] text-ink-faint">SHA-256 checked {answer.sha256}</p>
      </Card>
    );
  }
  return (
    <Card className="border-done/40 px-5 py-4" data-testid="verify-answer">
      <p className="flex items-center gap-2 text-lg font-semibold text-done">
        <ShieldCheck className="size-6 shrink-0" aria-hidden /> Signed consent record, unchanged
      </p>
      <p className="mt-2">{answer.message}</p>
      <dl className="mt-4 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1.5 text-sm">
        <dt className="text-ink-muted">Signed on</dt>
        <dd className="font-medium">{longDate(answer.signedOn)}</dd>
        <dt className="text-ink-muted">Form</dt>
        <dd className="font-medium">
          {answer.form.title}, version {answer.form.version}
        </dd>
        <dt className="text-ink-muted">State</dt>
        <dd className={cn('font-medium', answer.state === 'withdrawn' ? 'text-danger' : 'text-done')}>
          {answer.state === 'withdrawn' ? `Withdrawn on ${longDate(answer.withdrawnOn!)}` : 'Current'}
        </dd>
      </dl>
      <p className="mt-3 break-all font-mono text-[11px] text-ink-faint">SHA-256 checked {answer.sha256}</p>
    </Card>
  );
}
