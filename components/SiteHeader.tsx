import Link from 'next/link';
import { getServerSession } from 'next-auth';
import { authOptions } from '@/lib/auth/options';
import { navFor } from '@/lib/nav';
import { LogoMark } from '@/components/Logo';
import { SignOutButton } from '@/components/SignOutButton';
import { mayBeSignedIn } from '@/lib/auth/visitor';
import { HeaderMenu, NavLink } from '@/components/HeaderMenu';

export async function SiteHeader() {
  // Anonymous visitors (no session cookie) cost no session read.
  const session = (await mayBeSignedIn()) ? await getServerSession(authOptions) : null;
  const user = session?.user;
  const items = navFor(user?.roles);
  return (
    <header className="border-b border-ink-800 bg-ink-900 text-ink-100">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
        <Link href="/" className="flex items-center gap-2 text-lg font-extrabold tracking-tight text-white no-underline hover:no-underline">
          <LogoMark />
          Hotlap
        </Link>
        <HeaderMenu>
          <nav aria-label="Main" className="flex flex-col gap-1 text-sm md:flex-1 md:flex-row md:flex-wrap md:items-center">
            {items.map((item) => <NavLink key={item.href} href={item.href} label={item.label} />)}
          </nav>
          <div className="flex items-center gap-3 px-2.5 text-sm md:px-0">
            {user ? (
              <>
                <Link href="/account" className="text-ink-300" data-testid="signed-in-as" title="Your account">{user.name}</Link>
                <SignOutButton />
              </>
            ) : (
              <>
                <Link href="/signin" className="text-ink-100">Sign in</Link>
                <Link href="/signup" className="btn-primary">Sign up</Link>
              </>
            )}
          </div>
        </HeaderMenu>
      </div>
    </header>
  );
}
