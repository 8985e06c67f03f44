import Link from 'next/link';
import { JsonForm } from '@/components/forms/JsonForm';
import { PASSWORD_MIN_LENGTH } from '@/lib/domain';

export const metadata = { title: 'Choose a new password' };

export default async function ResetPage({ searchParams }: { searchParams: Promise<{ token?: string }> }) {
  const { token } = await searchParams;
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-4">Choose a new password</h1>
      {token ? (
        <JsonForm
          action="/api/account/password-reset/confirm"
          hidden={{ token }}
          fields={[{ name: 'password', label: 'New password', type: 'password', autoComplete: 'new-password', hint: `At least ${PASSWORD_MIN_LENGTH} characters.` }]}
          submitLabel="Save new password"
          successNote={<p className="mt-2"><Link href="/signin">Sign in with it</Link></p>}
        />
      ) : (
        <p>This page needs the link from the reset e-mail. <Link href="/forgot">Ask for one</Link>.</p>
      )}
    </div>
  );
}
