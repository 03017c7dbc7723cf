import { ShieldAlert, ShieldCheck } from 'lucide-react';
import { Badge } from '../../../components/ui/badge';
import { Button } from '../../../components/ui/button';
import { Card, CardHeader } from '../../../components/ui/card';
import { Notice } from '../../../components/ui/notice';
import { PageHeader, Spinner } from '../../../components/ui/page';
import { formatDateTime } from '../../../lib/format';
import { useCheckChains, useIntegrity, type IntegrityCheck } from '../api/integrity';

const grouped = (hex: string) => hex.match(/.{1,16}/g)!.join(' ');

/** Admins: the heads of the tamper-evident chains, a full check on demand, the digests e-mailed and the signing certificate. */
export function IntegrityPage() {
  const overview = useIntegrity();
  const check = useCheckChains();

  return (
    <>
      <PageHeader
        title="Record integrity"
        subtitle="Consent records, their evidence and withdrawals, and the access log are hash chains: a row changed later no longer leads to the heads below."
        actions={
          <Button variant="primary" onClick={() => check.mutate()} busy={check.isPending}>
            <ShieldCheck className="size-4" aria-hidden /> Check all chains now
          </Button>
        }
      />
      {check.data && <CheckResult result={check.data} />}
      {check.error && <Notice tone="danger">{check.error.message}</Notice>}
      {overview.isPending ? (
        <Spinner label="Loading chain heads" />
      ) : overview.error ? (
        <Notice tone="danger">{overview.error.message}</Notice>
      ) : (
        <div className="space-y-5">
          <Card>
            <CardHeader title="Chain heads" />
            <ul className="divide-y divide-line">
              {overview.data.chains.map((c) => (
                <li key={c.chain} className="px-5 py-3">
                  <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
                    <p className="font-semibold">{c.label}</p>
                    <p className="text-sm text-ink-muted">
                      {c.seq} {c.seq === 1 ? 'row' : 'rows'}
                      {c.updatedAt ? ` · last added ${formatDateTime(c.updatedAt)}` : ''}
                    </p>
                  </div>
                  <p className="mt-1 break-all font-mono text-xs text-ink-muted" aria-label={`Head hash of ${c.label}`}>
                    {grouped(c.hash)}
                  </p>
                </li>
              ))}
            </ul>
            <p className="border-t border-line px-5 py-3 text-sm text-ink-muted">
              Every day the heads are e-mailed to each admin. Keep those e-mails: they are the outside copy a rewrite of the database cannot change. On the server,
              <code className="mx-1 rounded bg-paper-sunk px-1.5 py-0.5 font-mono text-xs">npm run verify:records</code>
              makes the same check.
            </p>
          </Card>

          <div className="grid gap-5 lg:grid-cols-2">
            <Card>
              <CardHeader title="Daily digests" />
              {overview.data.digests.length === 0 ? (
                <p className="px-5 py-4 text-sm text-ink-muted">None sent yet: the first goes out this morning at the digest hour.</p>
              ) : (
                <ul className="divide-y divide-line text-sm">
                  {overview.data.digests.map((d) => (
                    <li key={d.day} className="flex items-center justify-between gap-3 px-5 py-2.5">
                      <span className="font-medium">{d.day}</span>
                      <span className="text-ink-muted">
                        to {d.recipients} {d.recipients === 1 ? 'admin' : 'admins'} · {formatDateTime(d.createdAt)}
                      </span>
                    </li>
                  ))}
                </ul>
              )}
            </Card>
            <Card>
              <CardHeader title="PDF signing certificate" />
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2 px-5 py-4 text-sm">
                <dt className="text-ink-muted">Signer</dt>
                <dd className="font-medium">{overview.data.certificate.commonName}</dd>
                <dt className="text-ink-muted">Source</dt>
                <dd>{overview.data.certificate.source === 'generated' ? 'Created by Twinframe at first start (self-signed)' : 'Supplied by configuration'}</dd>
                <dt className="text-ink-muted">Valid until</dt>
                <dd>{formatDateTime(overview.data.certificate.notAfter)}</dd>
                <dt className="text-ink-muted">SHA-256</dt>
                <dd className="break-all font-mono text-xs">{grouped(overview.data.certificate.fingerprint)}</dd>
              </dl>
            </Card>
          </div>
        </div>
      )}
    </>
  );
}

function CheckResult({ result }: { result: IntegrityCheck }) {
  return (
    <Card className="mb-5" data-testid="integrity-check">
      <div className="flex flex-wrap items-center justify-between gap-3 border-b border-line px-5 py-3">
        <p className={result.ok ? 'flex items-center gap-2 font-semibold text-done' : 'flex items-center gap-2 font-semibold text-danger'}>
          {result.ok ? <ShieldCheck className="size-5" aria-hidden /> : <ShieldAlert className="size-5" aria-hidden />}
          {result.ok ? 'Every chain verifies from its first row to its head' : 'A chain is broken'}
        </p>
        <span className="text-sm text-ink-muted">Checked {formatDateTime(result.checkedAt)}</span>
      </div>
      <ul className="divide-y divide-line">
        {result.chains.map((c) => (
          <li key={c.chain} className="px-5 py-3">
            <div className="flex flex-wrap items-center gap-2">
              <Badge tone={c.ok ? 'done' : 'danger'}>{c.ok ? 'Intact' : 'Broken'}</Badge>
              <span className="font-medium">{c.label}</span>
              <span className="text-sm text-ink-muted">
                {c.rows} {c.rows === 1 ? 'row' : 'rows'}{c.tombstones ? `, ${c.tombstones} erased (hash kept)` : ''}
                {c.digestsChecked ? `, ${c.digestsChecked} e-mailed ${c.digestsChecked === 1 ? 'head' : 'heads'} matched` : ''}
              </span>
            </div>
            {c.problem && <p className="mt-2 text-sm text-danger">First broken row: {c.problem.message}</p>}
          </li>
        ))}
      </ul>
    </Card>
  );
}
