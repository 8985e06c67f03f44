/** A rule's or a flag's severity, the same colour on every page: blocking in alarm red, advisory and info in ink. */
export function SeverityPill({ severity }: { severity: string }) {
  return <span className={`pill ${severity === 'blocking' ? 'bg-alarm-100 text-alarm-700' : 'bg-ink-100 text-ink-700'}`}>{severity}</span>;
}
