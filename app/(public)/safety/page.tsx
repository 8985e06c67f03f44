import { SafetyNotes } from '@/components/SafetyNotes';

export const metadata = { title: 'Safety' };

export default function SafetyPage() {
  return (
    <div className="max-w-3xl space-y-6">
      <h1>Safety notes for fast printing</h1>
      <p className="text-ink-700">
        Timed prints push machines to their limits. These cautions apply to every season; a season&apos;s rulebook may add more.
      </p>
      <SafetyNotes />
    </div>
  );
}
