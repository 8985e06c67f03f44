/** Public: check a G-code against a season's rulebook in the visitor's own browser (nothing is uploaded). */
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { checkRulebook } from '@/lib/check/rulebook';
import { HttpError } from '@/lib/errors';
import { GcodeCheck } from '@/components/GcodeCheck';

async function load(slug: string) {
  try {
    return await checkRulebook(slug);
  } catch (err) {
    if (err instanceof HttpError && err.status === 404) return null;
    throw err;
  }
}

export async function generateMetadata({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const rb = await load(slug);
  return { title: rb ? `Check a G-code · ${rb.season.name}` : 'Check a G-code' };
}

export default async function CheckPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const rulebook = await load(slug);
  if (!rulebook) notFound();
  return (
    <div className="space-y-6">
      <header className="space-y-2">
        <p className="text-sm"><Link href={`/seasons/${rulebook.season.slug}`}>← {rulebook.season.name}</Link> · <Link href={`/seasons/${rulebook.season.slug}/rulebook`}>Rulebook</Link></p>
        <h1>Check a G-code against this rulebook</h1>
        <p className="text-ink-600">
          Before you print, see how your sliced file fares against {rulebook.season.name}&apos;s rules: the rule results, volumetric flow, layers and the
          time estimate. The check runs in your browser with the same inspection engine the server uses; the file is not uploaded.
        </p>
      </header>
      <GcodeCheck seasonSlug={rulebook.season.slug} rulebook={rulebook} />
    </div>
  );
}
