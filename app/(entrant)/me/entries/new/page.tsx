import { requirePageRole } from '@/lib/auth/guard';
import { entryFormOptions } from '@/lib/entries';
import { NewEntryForm } from '@/components/entrant/NewEntryForm';
import { SafetyNotes } from '@/components/SafetyNotes';

export const metadata = { title: 'New entry' };

export default async function NewEntryPage({ searchParams }: { searchParams: Promise<{ season?: string }> }) {
  const { season } = await searchParams;
  const user = await requirePageRole(`/me/entries/new${season ? `?season=${encodeURIComponent(season)}` : ''}`, 'entrant');
  const options = await entryFormOptions(user.id);
  const chosen = options.seasons.find((s) => s.slug === season);
  return (
    <div className="grid gap-8 lg:grid-cols-[2fr_1fr]">
      <div className="card space-y-4">
        <h1>New entry{chosen ? ` · ${chosen.name}` : ''}</h1>
        <p className="text-sm text-ink-600">Your entry is saved as a draft when the files arrive, and Hotlap inspects the G-code at once. You can fix what the inspection finds before you submit.</p>
        <NewEntryForm options={options} seasonId={chosen?.id} />
      </div>
      <aside className="space-y-4">
        <SafetyNotes />
      </aside>
    </div>
  );
}
