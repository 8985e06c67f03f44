const TONE: Record<string, string> = {
  draft: 'bg-ink-100 text-ink-700',
  open: 'bg-coolant-100 text-coolant-700',
  judging: 'bg-ember-100 text-ember-800',
  final: 'bg-ink-800 text-white',
  archived: 'bg-ink-200 text-ink-600',
  submitted: 'bg-ember-100 text-ember-800',
  verified: 'bg-coolant-100 text-coolant-700',
  rejected: 'bg-alarm-100 text-alarm-700',
  returned: 'bg-ink-100 text-ink-800',
  withdrawn: 'bg-ink-100 text-ink-500',
};

export function StatePill({ state }: { state: string }) {
  return <span className={`pill ${TONE[state] ?? 'bg-ink-100 text-ink-700'}`}>{state}</span>;
}
