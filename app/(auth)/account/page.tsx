import { requirePageRole } from '@/lib/auth/guard';
import { ROLE_LABELS } from '@/lib/domain';
import { SignOutEverywhereButton } from './SignOutEverywhereButton';

export const metadata = { title: 'Your account' };

export default async function AccountPage() {
  const user = await requirePageRole('/account');
  return (
    <div className="mx-auto max-w-md card space-y-4">
      <h1>Your account</h1>
      <dl className="text-sm">
        <dt className="font-semibold">Name</dt>
        <dd className="mb-2">{user.name}</dd>
        <dt className="font-semibold">E-mail</dt>
        <dd className="mb-2">{user.email}</dd>
        <dt className="font-semibold">Roles</dt>
        <dd>{user.roles.map((r) => ROLE_LABELS[r]).join(', ')}</dd>
      </dl>
      <section className="space-y-2">
        <h2 className="text-base font-semibold">Sessions</h2>
        <p className="text-sm text-ink-600">
          Signed in on a shared or lost device? Signing out everywhere ends every session of this account, this one
          included. Changing your password does the same.
        </p>
        <SignOutEverywhereButton />
      </section>
    </div>
  );
}
