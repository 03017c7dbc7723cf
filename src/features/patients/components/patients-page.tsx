import { useEffect, useRef, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { ChevronLeft, ChevronRight, Plus, Search } from 'lucide-react';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { Dialog } from '../../../components/ui/dialog';
import { Input } from '../../../components/ui/field';
import { Notice } from '../../../components/ui/notice';
import { EmptyState, PageHeader, Spinner } from '../../../components/ui/page';
import { ageFrom, formatDate } from '../../../lib/format';
import { useCreatePatient, usePatients } from '../api/patients';
import { PatientForm } from './patient-form';

const PAGE_SIZE = 15;

export function PatientsPage() {
  const [params, setParams] = useSearchParams();
  const q = params.get('q') ?? '';
  const page = Math.max(1, Number(params.get('page') ?? 1) || 1);
  const [draft, setDraft] = useState(q);
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();
  const create = useCreatePatient();
  const { data, isPending, error, isFetching } = usePatients({ q, page, pageSize: PAGE_SIZE });

  // Opening a patient while the search is still settling must not bring the search back: the next
  // screen loads on demand, so this one stays mounted (and its timer alive) for a moment.
  const leaving = useRef(false);
  const openPatient = () => {
    leaving.current = true;
  };

  useEffect(() => {
    const t = setTimeout(() => {
      if (!leaving.current && draft !== q) setParams(draft ? { q: draft } : {}, { replace: true });
    }, 250);
    return () => clearTimeout(t);
  }, [draft, q, setParams]);

  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;
  const goTo = (p: number) => setParams({ ...(q ? { q } : {}), page: String(p) });

  return (
    <>
      <PageHeader
        title="Patients"
        subtitle={data ? `${data.total} ${data.total === 1 ? 'patient' : 'patients'}${q ? ` matching “${q}”` : ''}` : ' '}
        actions={
          <Button variant="primary" onClick={() => setCreating(true)}>
            <Plus className="size-4" /> New patient
          </Button>
        }
      />
      <div className="relative mb-4">
        <Search className="pointer-events-none absolute top-1/2 left-3 size-5 -translate-y-1/2 text-ink-faint" aria-hidden />
        <Input
          type="search"
          value={draft}
          onChange={(e) => setDraft(e.target.value)}
          placeholder="Search by name, clinic code or date of birth (YYYY-MM-DD or DD/MM/YYYY)"
          aria-label="Search patients"
          className="min-h-12 pl-10 text-base"
        />
      </div>
      {error && <Notice tone="danger">{error.message}</Notice>}
      {isPending ? (
        <Spinner label="Loading patients" />
      ) : data && data.items.length === 0 ? (
        <EmptyState title={q ? 'No patient matches this search' : 'No patients yet'}>{q ? 'Try part of the name, the clinic code, or the date of birth.' : 'Add the first patient to begin.'}</EmptyState>
      ) : (
        <Card className={isFetching ? 'opacity-80 transition-opacity' : ''}>
          <table className="w-full text-left">
            <thead className="border-b border-line text-xs tracking-wide text-ink-faint uppercase">
              <tr>
                <th className="px-5 py-3 font-medium">Patient</th>
                <th className="px-3 py-3 font-medium">Code</th>
                <th className="px-3 py-3 font-medium">Date of birth</th>
                <th className="hidden px-3 py-3 font-medium md:table-cell">Contact</th>
              </tr>
            </thead>
            <tbody>
              {data?.items.map((p) => (
                <tr key={p.id} className="cursor-pointer border-b border-line last:border-0 hover:bg-paper-sunk/60" onClick={() => {
                    openPatient();
                    navigate(`/patients/${p.id}`);
                  }}>
                  <td className="px-5 py-3">
                    <Link to={`/patients/${p.id}`} className="font-medium text-ink hover:underline" onClick={(e) => {
                        e.stopPropagation();
                        openPatient();
                      }}>
                      {p.lastName}, {p.firstName}
                    </Link>
                  </td>
                  <td className="px-3 py-3 font-mono text-sm text-ink-muted">{p.code}</td>
                  <td className="px-3 py-3 text-ink-muted">
                    {formatDate(p.dateOfBirth)} <span className="text-ink-faint">· {ageFrom(p.dateOfBirth)}</span>
                  </td>
                  <td className="hidden px-3 py-3 text-sm text-ink-muted md:table-cell">{p.email ?? p.phone ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {pages > 1 && (
            <nav className="flex items-center justify-between border-t border-line px-5 py-2" aria-label="Pages">
              <Button variant="ghost" size="sm" disabled={page <= 1} onClick={() => goTo(page - 1)}>
                <ChevronLeft className="size-4" /> Previous
              </Button>
              <span className="text-sm text-ink-muted">
                Page {page} of {pages}
              </span>
              <Button variant="ghost" size="sm" disabled={page >= pages} onClick={() => goTo(page + 1)}>
                Next <ChevronRight className="size-4" />
              </Button>
            </nav>
          )}
        </Card>
      )}
      <Dialog open={creating} onClose={() => setCreating(false)} title="New patient">
        <PatientForm
          submitLabel="Create patient"
          onCancel={() => setCreating(false)}
          onSubmit={async (values) => {
            const p = await create.mutateAsync(values);
            setCreating(false);
            navigate(`/patients/${p.id}`);
          }}
        />
      </Dialog>
    </>
  );
}
