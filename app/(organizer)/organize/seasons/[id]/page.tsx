import Link from 'next/link';
import { parseId } from '@/lib/ids';
import { notFound } from 'next/navigation';
import { requirePageRole } from '@/lib/auth/guard';
import { organizerSeasonView } from '@/lib/seasons/view';
import { HttpError } from '@/lib/errors';
import { StatePill } from '@/components/StatePill';
import { SeasonForm } from '@/components/organizer/SeasonForm';
import { TestPieceUpload } from '@/components/organizer/TestPieceUpload';
import { ClassesEditor } from '@/components/organizer/ClassesEditor';
import { RulebookEditor } from '@/components/organizer/RulebookEditor';
import { LifecyclePanel } from '@/components/organizer/LifecyclePanel';
import { JudgesPanel } from '@/components/organizer/JudgesPanel';
import { OrganizersPanel } from '@/components/organizer/OrganizersPanel';
import { ENTRY_STATES } from '@/lib/domain';

export const metadata = { title: 'Season' };

export default async function SeasonAdminPage({ params }: { params: Promise<{ id: string }> }) {
  const { id: raw } = await params;
  const user = await requirePageRole(`/organize/seasons/${raw}`, 'organizer');
  const id = parseId(raw);
  if (id === null) notFound();
  const view = await organizerSeasonView({ user }, id).catch((err) => {
    if (err instanceof HttpError && err.status === 404) notFound();
    throw err;
  });
  const { season, dashboard } = view;
  const closed = season.state === 'final' || season.state === 'archived' ? `The season is ${season.state}: this is frozen with its standings.` : null;
  const submitted = view.submittedEntries;
  const pieceLocked = closed ?? (submitted > 0 ? `Entries were already printed against this test piece (${submitted}); it can no longer change.` : null);
  const section = 'card space-y-4';
  return (
    <div className="space-y-6">
      <p className="text-sm"><Link href="/organize">← Organize</Link></p>
      <header className="flex flex-wrap items-center gap-3">
        <h1>{season.name}</h1>
        <StatePill state={season.state} />
        {season.state !== 'draft' && <Link href={`/seasons/${season.slug}`}>Public page</Link>}
        {season.state !== 'draft' && <Link href={`/seasons/${season.slug}/rulebook`}>Public rulebook</Link>}
      </header>

      <section className={section} aria-labelledby="h-lifecycle">
        <h2 id="h-lifecycle">Lifecycle</h2>
        {dashboard && (
          <p className="text-sm text-ink-600" data-testid="season-counts">
            Entries: {ENTRY_STATES.map((s) => `${dashboard.entries[s]} ${s}`).join(' · ')}
          </p>
        )}
        <LifecyclePanel seasonId={season.id} state={season.state} next={view.next} subscribers={view.subscribers}
          canReinspect={submitted > 0 && !closed}
          window={{ opensAt: new Date(season.opensAt).toISOString(), closesAt: new Date(season.closesAt).toISOString(), timeZone: season.timeZone }} />
      </section>

      <section className={section} aria-labelledby="h-settings">
        <h2 id="h-settings">Settings</h2>
        <SeasonForm seasonId={season.id} initial={season} locked={closed} />
      </section>

      <section className={section} aria-labelledby="h-piece">
        <h2 id="h-piece">Test piece</h2>
        <TestPieceUpload seasonId={season.id} current={view.testPiece} locked={pieceLocked} />
      </section>

      <section className={section} aria-labelledby="h-classes">
        <h2 id="h-classes">Classes</h2>
        <ClassesEditor seasonId={season.id} classes={view.classes} frozen={closed} />
      </section>

      <section className={section} aria-labelledby="h-rules">
        <h2 id="h-rules">Rulebook</h2>
        <RulebookEditor seasonId={season.id} classes={view.classes.map((c) => ({ id: c.id, name: c.name }))} rules={view.rules} freeze={view.freeze} />
      </section>

      <section className={section} aria-labelledby="h-judges">
        <h2 id="h-judges">Judges</h2>
        <JudgesPanel seasonId={season.id} judges={view.judges} invitations={view.invitations} closed={closed} />
      </section>

      <section className={section} aria-labelledby="h-organizers">
        <h2 id="h-organizers">Organizers</h2>
        <OrganizersPanel seasonId={season.id} organizers={view.organizers} />
      </section>
    </div>
  );
}
