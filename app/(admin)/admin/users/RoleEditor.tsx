'use client';
import { useState } from 'react';
import { ROLES, ROLE_LABELS, type Role } from '@/lib/domain';

export function RoleEditor({ userId, userName, initial }: { userId: number; userName: string; initial: Role[] }) {
  const [roles, setRoles] = useState<Role[]>(initial);
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function save() {
    setBusy(true);
    setStatus(null);
    const res = await fetch(`/api/admin/users/${userId}/roles`, {
      method: 'PUT',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ roles }),
    });
    const data = await res.json().catch(() => ({}));
    setBusy(false);
    if (res.ok) {
      setRoles(data.roles);
      setStatus({ ok: true, text: 'Saved' });
    } else setStatus({ ok: false, text: data.error ?? `Error ${res.status}` });
  }

  return (
    <fieldset className="flex flex-wrap items-center gap-3">
      <legend className="sr-only">Roles of {userName}</legend>
      {ROLES.map((r) => (
        <label key={r} className="flex items-center gap-1 text-sm">
          <input
            type="checkbox"
            name={`role-${r}`}
            checked={roles.includes(r)}
            disabled={r === 'entrant'}
            onChange={(e) => setRoles((cur) => (e.target.checked ? [...cur, r] : cur.filter((x) => x !== r)))}
          />
          {ROLE_LABELS[r]}
        </label>
      ))}
      <button type="button" className="btn-quiet py-1" onClick={save} disabled={busy}>Save roles</button>
      {status && <span role="status" className={status.ok ? 'text-sm text-coolant-700' : 'text-sm text-alarm-600'}>{status.text}</span>}
    </fieldset>
  );
}
