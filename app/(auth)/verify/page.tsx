import { JsonForm } from '@/components/forms/JsonForm';
import Link from 'next/link';

export const metadata = { title: 'Confirm your e-mail' };

export default async function VerifyPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  const { token } = await searchParams;
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-4">Confirm your e-mail</h1>
      {token ? (
        <JsonForm
          action="/api/account/verify"
          hidden={{ token }}
          fields={[]}
          submitLabel="Confirm my e-mail"
          successNote={<p className="mt-2"><Link href="/signin">Sign in now</Link></p>}
        />
      ) : (
        <>
          <p className="mb-4 text-sm text-ink-600">Lost the link, or it expired? We will send a new one.</p>
          <JsonForm action="/api/account/verify/resend" fields={[{ name: 'email', label: 'E-mail', type: 'email', autoComplete: 'email' }]} submitLabel="Send a new link" />
        </>
      )}
    </div>
  );
}
