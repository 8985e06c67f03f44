'use client';
/**
 * The header's navigation and account links. Wide screens show them in a row; below the `md`
 * breakpoint they fold behind a menu button (aria-expanded, aria-controls; Escape closes and
 * returns focus to the button; following a link closes it).
 */
import { useEffect, useRef, useState } from 'react';
import Link from 'next/link';
import { usePathname } from 'next/navigation';

export function HeaderMenu({ children }: { children: React.ReactNode }) {
  const [open, setOpen] = useState(false);
  const button = useRef<HTMLButtonElement>(null);
  const pathname = usePathname();
  // A new page closes the menu (render-time reset, no effect needed).
  const [shownFor, setShownFor] = useState(pathname);
  if (shownFor !== pathname) {
    setShownFor(pathname);
    setOpen(false);
  }

  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'Escape') {
        setOpen(false);
        button.current?.focus();
      }
    };
    document.addEventListener('keydown', onKey);
    return () => document.removeEventListener('keydown', onKey);
  }, [open]);

  return (
    <>
      <button
        ref={button}
        type="button"
        className="ml-auto inline-flex items-center gap-2 rounded-md border border-ink-700 px-3 py-1.5 text-sm text-ink-100 md:hidden"
        aria-expanded={open}
        aria-controls="site-menu"
        onClick={() => setOpen((o) => !o)}
        data-testid="menu-button"
      >
        <span aria-hidden="true" className="text-base leading-none">{open ? '✕' : '☰'}</span>
        Menu
      </button>
      <div
        id="site-menu"
        className={`${open ? 'flex' : 'hidden'} w-full flex-col gap-2 pb-2 md:flex md:w-auto md:flex-1 md:flex-row md:items-center md:gap-6 md:pb-0`}
        onClick={(e) => {
          if ((e.target as HTMLElement).closest('a')) setOpen(false);
        }}
      >
        {children}
      </div>
    </>
  );
}

export function NavLink({ href, label }: { href: string; label: string }) {
  const pathname = usePathname();
  const current = pathname === href || pathname.startsWith(`${href}/`);
  return (
    <Link
      href={href}
      aria-current={current ? 'page' : undefined}
      className="rounded-md px-2.5 py-2 text-ink-200 no-underline hover:bg-ink-800 hover:text-white hover:no-underline aria-[current=page]:text-white md:py-1.5"
    >
      {label}
    </Link>
  );
}
