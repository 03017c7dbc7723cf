import { useForm } from 'react-hook-form';
import { Link, useLocation, useNavigate } from 'react-router-dom';
import type { LoginInput } from '../../../../server/features/auth/auth.schemas';
import { Button } from '../../../components/ui/button';
import { Field, Input } from '../../../components/ui/field';
import { Logo } from '../../../components/ui/logo';
import { Notice } from '../../../components/ui/notice';
import { ApiError } from '../../../lib/api-client';
import { useLogin } from '../api/auth';

export function SignInPage() {
  const login = useLogin();
  const navigate = useNavigate();
  const location = useLocation();
  const state = location.state as { from?: string; reason?: string } | null;
  // Plain rules here (not the zod schema) keep the validation library out of the first bundle.
  const { register, handleSubmit, formState } = useForm<LoginInput>({ defaultValues: { email: '', password: '' } });

  const onSubmit = handleSubmit((values) =>
    login.mutate(values, { onSuccess: () => navigate(state?.from && state.from !== '/sign-in' ? state.from : '/', { replace: true }) }),
  );
  const error = login.error instanceof ApiError ? login.error.message : login.error ? 'Could not reach Twinframe. Check the connection and try again.' : null;

  return (
    <main className="grid min-h-dvh place-items-center px-4 py-10">
      <div className="w-full max-w-[26rem]">
        <div className="mb-8 flex items-center gap-3">
          <Logo />
          <div>
            <p className="font-display text-3xl font-semibold leading-none">Twinframe</p>
            <p className="mt-1 text-sm text-ink-muted">Photo and consent record</p>
          </div>
        </div>
        <form onSubmit={onSubmit} noValidate className="space-y-5 rounded-2xl border border-line bg-paper-raised p-6 shadow-sm">
          <h1 className="text-2xl font-semibold">Sign in</h1>
          {state?.reason === 'SESSION_ENDED' && <Notice tone="warn">You were signed out after a period without activity. Please sign in again.</Notice>}
          {error && <Notice tone="danger">{error}</Notice>}
          <Field label="E-mail" error={formState.errors.email?.message}>
            {(p) => <Input {...p} type="email" autoComplete="username" inputMode="email" autoFocus {...register('email', { validate: (v) => v.trim() !== '' || 'Enter your e-mail.' })} />}
          </Field>
          <Field label="Password" error={formState.errors.password?.message}>
            {(p) => <Input {...p} type="password" autoComplete="current-password" {...register('password', { required: 'Enter your password.' })} />}
          </Field>
          <Button type="submit" variant="primary" size="lg" className="w-full" busy={login.isPending}>
            Sign in
          </Button>
        </form>
        <p className="mt-6 text-center text-xs text-ink-faint">For clinic staff. Patients sign their forms in hand-over mode on a clinic tablet.</p>
        <p className="mt-2 text-center text-sm">
          <Link to="/verify" className="text-ink-muted underline underline-offset-4 hover:text-ink">
            Check a consent document
          </Link>
        </p>
      </div>
    </main>
  );
}
