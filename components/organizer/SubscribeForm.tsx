/** "Get announcements" for a season: a plain form posting to a server action (works without JS). */
import { toggleSubscription } from '@/app/(public)/seasons/[slug]/rulebook/actions';

export function SubscribeForm({ slug, back, subscribed, signedIn }: { slug: string; back: string; subscribed: boolean; signedIn: boolean }) {
  return (
    <form action={toggleSubscription} className="flex flex-wrap items-center gap-3 text-sm" data-testid="subscribe-form">
      <input type="hidden" name="slug" value={slug} />
      <input type="hidden" name="back" value={back} />
      <input type="hidden" name="on" value={subscribed ? '0' : '1'} />
      <button type="submit" className="btn-quiet py-1">{subscribed ? 'Stop announcements' : 'Get announcements by e-mail'}</button>
      <span className="text-ink-600">
        {subscribed ? 'You get a mail when this season opens, closes for judging or publishes final standings.' : signedIn ? 'A mail when the season changes state.' : 'Sign in to get a mail when the season changes state.'}
      </span>
    </form>
  );
}
