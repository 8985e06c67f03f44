'use server';
/** Accepting a judge invitation: only the signed-in owner of the invited address can. */
import { redirect } from 'next/navigation';
import { headers } from 'next/headers';
import { currentUser } from '@/lib/auth/guard';
import { acceptInvitation } from '@/lib/seasons/judges';
import { clientIp } from '@/lib/http';
import { HttpError } from '@/lib/errors';

export async function acceptInvitationAction(_prev: { error: string | null }, formData: FormData): Promise<{ error: string | null }> {
  const token = String(formData.get('token') ?? '');
  const user = await currentUser();
  if (!user) redirect(`/signin?callbackUrl=${encodeURIComponent(`/invite?token=${token}`)}`);
  try {
    await acceptInvitation(user, token, clientIp(await headers()));
  } catch (err) {
    if (err instanceof HttpError) return { error: err.message };
    throw err;
  }
  redirect('/judging?welcome=1');
}
