import Link from 'next/link';
import { JsonForm } from '@/components/forms/JsonForm';
import { PASSWORD_MIN_LENGTH } from '@/lib/domain';

export const metadata = { title: 'Create an account' };

export default function SignUpPage() {
  return (
    <div className="mx-auto max-w-md card">
      <h1 className="mb-2">Create an account</h1>
      <p className="mb-6 text-sm text-ink-600">Every account can enter contests. Organizers appoint judges; admins grant other roles.</p>
      <JsonForm
        action="/api/account/signup"
        submitLabel="Create account"
        fields={[
          { name: 'name', label: 'Name shown in standings', autoComplete: 'nickname' },
          { name: 'email', label: 'E-mail', type: 'email', autoComplete: 'email' },
          { name: 'password', label: 'Password', type: 'password', autoComplete: 'new-password', hint: `At least ${PASSWORD_MIN_LENGTH} characters.` },
        ]}
        footer={<p className="text-sm">Already registered? <Link href="/signin">Sign in</Link></p>}
      />
    </div>
  );
}
