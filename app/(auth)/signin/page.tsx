import { SignInForm } from './SignInForm';

export const metadata = { title: 'Sign in' };

/** Only same-site paths are allowed as a return address. */
function safeCallback(raw: string | undefined) {
  return raw && raw.startsWith('/') && !raw.startsWith('//') ? raw : '/';
}

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const sp = await searchParams;
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-6">Sign in</h1>
      <SignInForm callbackUrl={safeCallback(sp.callbackUrl)} initialError={sp.error ?? null} />
    </div>
  );
}
