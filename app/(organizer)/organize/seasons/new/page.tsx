import Link from 'next/link';
import { requirePageRole } from '@/lib/auth/guard';
import { SeasonForm } from '@/components/organizer/SeasonForm';
import { TIMING_CONVENTIONS } from '@/lib/seasons/schemas';
import { utcToZonedLocal } from '@/lib/seasons/time';

export const metadata = { title: 'New season' };

const DAY_MS = 24 * 3600_000;

/** A first suggestion: opening at noon a week from now, six weeks long. */
function suggestedDates() {
  const start = new Date(Math.ceil(Date.now() / DAY_MS) * DAY_MS + 7 * DAY_MS + 12 * 3600_000);
  return { opensAt: utcToZonedLocal(start, 'UTC'), closesAt: utcToZonedLocal(new Date(start.getTime() + 42 * DAY_MS), 'UTC') };
}

export default async function NewSeasonPage() {
  await requirePageRole('/organize/seasons/new', 'organizer');
  return (
    <div className="space-y-6">
      <p className="text-sm"><Link href="/organize">← Organize</Link></p>
      <h1>New season</h1>
      <section className="card">
        <SeasonForm
          initial={{
            name: '', slug: '', hostName: '', description: '',
            ...suggestedDates(), timeZone: 'UTC',
            timingConvention: TIMING_CONVENTIONS[0], photosRequired: 2, photoKinds: [], videoRequired: true, entryLimit: 3, verificationsRequired: 1,
          }}
        />
      </section>
    </div>
  );
}
