'use client';
/**
 * Shown to members only: next-auth's client is loaded when the button is pressed, so that the pages
 * every visitor loads do not carry it.
 */
export function SignOutButton() {
  return (
    <button type="button" className="btn-quiet py-1.5" onClick={async () => (await import('next-auth/react')).signOut({ callbackUrl: '/' })}>
      Sign out
    </button>
  );
}
