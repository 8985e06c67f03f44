'use client';
import { signOut } from 'next-auth/react';

export function SignOutButton() {
  return (
    <button type="button" className="btn-quiet py-1.5" onClick={() => signOut({ callbackUrl: '/' })}>
      Sign out
    </button>
  );
}
