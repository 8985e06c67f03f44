import Link from 'next/link';
import { connection } from 'next/server';
import { publicSeasons } from '@/lib/queries';
import { StatePill } from '@/components/StatePill';
import { formatDate, formatSeasonWindow } from '@/lib/format';
import { keptForVersion } from '@/lib/standings/publicCache';

export default async function HomePage() {
  await connection();
  const seasons = await keptForVersion('home', publicSeasons);
  return (
    <div className="space-y-10">
      <section className="rounded-2xl bg-ink-900 px-6 py-10 text-ink-100 sm:px-10">
        <p className="mb-2 text-sm font-semibold uppercase tracking-widest text-ember-400">Speed with quality</p>
        <h1 className="max-w-3xl text-3xl font-extrabold text-white sm:text-4xl">Print the test piece fast and clean. We check the G-code.</h1>
        <p className="mt-4 max-w-2xl text-ink-300">
          Every entry&apos;s file is inspected against the season&apos;s rulebook: volumetric flow, layer height, walls,
          top and bottom layers, infill and an independent print-time estimate. Judges see the evidence side by side;
          standings show only verified prints.
        </p>
        <div className="mt-6 flex gap-3">
          <Link href="/seasons" className="btn-primary">Browse seasons</Link>
          <Link href="/signup" className="btn-quiet">Enter a contest</Link>
        </div>
      </section>
      <section>
        <h2 className="mb-4 text-xl">Seasons</h2>
        {seasons.length === 0 ? (
          <p className="text-ink-600">No season is open yet.</p>
        ) : (
          <ul className="grid gap-4 sm:grid-cols-2">
            {seasons.map((s) => (
              <li key={s.id} className="card">
                <div className="flex items-center justify-between gap-2">
                  <Link href={`/seasons/${s.slug}`} className="text-lg font-semibold">{s.name}</Link>
                  <StatePill state={s.state} />
                </div>
                <p className="text-sm text-ink-600">{s.hostName} · {formatSeasonWindow(s.opensAt, s.closesAt, s.timeZone, false)}</p>
                <p className="mt-2 text-sm text-ink-700">{s.classes.map((c) => c.name).join(' · ')}</p>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
