/** Hotlap mark: a nozzle tip drawing one lap of a rounded track, in ember on ink. */
export function LogoMark({ className = 'h-8 w-8' }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} role="img" aria-label="Hotlap">
      <rect width="32" height="32" rx="8" fill="#161b20" />
      <path d="M7 20.5c0-4.4 3.6-8 8-8h6.5a3.5 3.5 0 0 1 0 7H14" fill="none" stroke="#fd8034" strokeWidth="3" strokeLinecap="round" />
      <path d="M11 7h7l-1.6 4h-3.8z" fill="#e7ebee" />
      <circle cx="14" cy="19.5" r="1.9" fill="#f25f0e" />
    </svg>
  );
}
