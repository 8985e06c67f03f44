'use client';
/**
 * The state behind an "act on an account by e-mail" panel (judges, co-organizers): the address,
 * its field error, the outcome line and a busy flag; `submit` posts `{ email }`, `remove` deletes
 * after a confirmation. Both refresh the page on success.
 */
import { useState } from 'react';
import { useRouter } from 'next/navigation';
import { JudgeByEmailSchema } from '@/lib/seasons/schemas';
import { callApi, sendChecked } from '@/components/organizer/api';

export function useEmailAction() {
  const router = useRouter();
  const [email, setEmail] = useState('');
  const [fieldError, setFieldError] = useState<string | undefined>();
  const [outcome, setOutcome] = useState<{ error?: string; message?: string }>({});
  const [busy, setBusy] = useState(false);

  async function submit(url: string) {
    setOutcome({});
    setBusy(true);
    const res = await sendChecked(JudgeByEmailSchema, { email }, url, 'POST');
    setBusy(false);
    setFieldError(res.fields.email);
    if (!res.ok) return setOutcome({ error: res.error ?? undefined });
    setEmail('');
    setOutcome({ message: res.data.message });
    router.refresh();
  }

  async function remove(url: string, confirmText: string) {
    if (!window.confirm(confirmText)) return;
    const res = await callApi(url, 'DELETE');
    setOutcome(res.ok ? { message: res.data.message } : { error: res.data.error ?? `The server answered ${res.status}.` });
    if (res.ok) router.refresh();
  }

  return { email, setEmail, fieldError, outcome, busy, submit, remove };
}
