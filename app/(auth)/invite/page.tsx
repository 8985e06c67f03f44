import Link from 'next/link';
import { currentUser } from '@/lib/auth/guard';
import { viewInvitation } from '@/lib/seasons/judges';
import { SignOutButton } from '@/components/SignOutButton';
import { AcceptForm } from './AcceptForm';

export const metadata = { title: 'Judge invitation' };

export default async function InvitePage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const token = (await searchParams).token ?? '';
  const inv = await viewInvitation(token);
  const user = await currentUser();
  const here = `/invite?token=${encodeURIComponent(token)}`;
  return (
    <div className="mx-auto max-w-md card space-y-4">
      <h1>Judge invitation</h1>
      {inv.status !== 'valid' ? (
        <p role="alert" data-testid="form-error" className="text-alarm-700">{inv.message}</p>
      ) : (
        <>
          <p>You are invited to judge <strong>{inv.seasonName}</strong>, hosted by {inv.hostName}. The invitation is for <strong>{inv.email}</strong>.</p>
          {!user ? (
            <div className="space-y-2 text-sm">
              <p>Sign in with that address to accept. No account yet? Create one with that address, confirm it, then open this link again.</p>
              <p className="flex gap-3">
                <Link className="btn-primary" href={`/signin?callbackUrl=${encodeURIComponent(here)}`}>Sign in to accept</Link>
                <Link className="btn-quiet" href="/signup">Create an account</Link>
              </p>
            </div>
          ) : user.email.toLowerCase() !== inv.email.toLowerCase() ? (
            <div className="space-y-2">
              <p role="alert" className="text-alarm-700">You are signed in as {user.email}, but this invitation is for {inv.email}. Sign out and sign in with the invited address.</p>
              <SignOutButton />
            </div>
          ) : (
            <AcceptForm token={token} seasonName={inv.seasonName} />
          )}
        </>
      )}
    </div>
  );
}
