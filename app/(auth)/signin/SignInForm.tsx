'use client';
import { useState } from 'react';
import { signIn } from 'next-auth/react';
import Link from 'next/link';
import { Field } from '@/components/forms/Field';
import { signInError } from '@/lib/auth/messages';
import { safeCallbackPath } from '@/lib/security/urls';

export function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError: string | null }) {
  const [error, setError] = useState<string | null>(signInError(initialError));
  const [code, setCode] = useState<string | null>(initialError);
  const [busy, setBusy] = useState(false);

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    const form = new FormData(e.currentTarget);
    const res = await signIn('credentials', {
      redirect: false,
      email: String(form.get('email') ?? ''),
      password: String(form.get('password') ?? ''),
      callbackUrl,
    });
    setBusy(false);
    if (res?.ok && !res.error) {
      // Resolved against this page's own origin once more before leaving it.
      window.location.assign(safeCallbackPath(callbackUrl, window.location.origin));
      return;
    }
    const c = res?.status === 429 ? 'TooManyAttempts' : (res?.error ?? 'CredentialsSignin');
    setCode(c);
    setError(signInError(c));
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <Field name="email" label="E-mail" type="email" autoComplete="email" />
      <Field name="password" label="Password" type="password" autoComplete="current-password" />
      {error && (
        <div className="rounded-lg border border-alarm-500 bg-alarm-50 p-3 text-sm text-alarm-700" role="alert" data-testid="form-error" data-code={code ?? undefined}>
          {error}
          {code === 'EmailNotVerified' && (
            <> <Link href="/verify">Send a new link</Link>.</>
          )}
        </div>
      )}
      <button type="submit" className="btn-primary w-full" disabled={busy}>{busy ? 'Signing in…' : 'Sign in'}</button>
      <p className="flex justify-between text-sm">
        <Link href="/forgot">Forgot your password?</Link>
        <Link href="/signup">Create an account</Link>
      </p>
    </form>
  );
}
