import { SignInForm } from './SignInForm';
import { safeCallbackPath } from '@/lib/security/urls';
import { appOrigin } from '@/lib/http';

export const metadata = { title: 'Sign in' };

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const sp = await searchParams;
  const raw = Array.isArray(sp.callbackUrl) ? sp.callbackUrl[0] : sp.callbackUrl;
  const error = Array.isArray(sp.error) ? sp.error[0] : sp.error;
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-6">Sign in</h1>
      {/* Only a path on this site survives (lib/security/urls.ts); the form checks it again. */}
      <SignInForm callbackUrl={safeCallbackPath(raw, appOrigin())} initialError={error ?? null} />
    </div>
  );
}
