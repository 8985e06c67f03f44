/** A rule's severity as the public season pages show it: blocking in alarm red, advisory in ink. */
export function SeverityPill({ severity }: { severity: string }) {
  return <span className={`pill ${severity === 'blocking' ? 'bg-alarm-100 text-alarm-700' : 'bg-ink-100 text-ink-700'}`}>{severity}</span>;
}
