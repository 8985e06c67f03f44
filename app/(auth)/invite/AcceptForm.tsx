'use client';
import { useActionState } from 'react';
import { acceptInvitationAction } from './actions';

export function AcceptForm({ token, seasonName }: { token: string; seasonName: string }) {
  const [state, action, pending] = useActionState(acceptInvitationAction, { error: null });
  return (
    <form action={action} className="space-y-3">
      <input type="hidden" name="token" value={token} />
      {state.error && <p className="rounded-lg border border-alarm-500 bg-alarm-50 p-3 text-sm text-alarm-700" role="alert" data-testid="form-error">{state.error}</p>}
      <button type="submit" className="btn-primary w-full" disabled={pending}>{pending ? 'Working…' : `Accept and judge ${seasonName}`}</button>
    </form>
  );
}
