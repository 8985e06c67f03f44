/** Season subscriptions: signed-in people who want a mail when a season changes state. */
import { SeasonSubscription, User, type Season } from '@/models';
import { sendMail, appUrl, linkMail } from '@/lib/mail';
import { formatDateTime } from '@/lib/format';
import type { SeasonState } from '@/lib/domain';

export async function isSubscribed(seasonId: number, userId: number): Promise<boolean> {
  return (await SeasonSubscription.count({ where: { seasonId, userId } })) > 0;
}

export async function setSubscription(seasonId: number, userId: number, on: boolean): Promise<boolean> {
  if (on) await SeasonSubscription.findOrCreate({ where: { seasonId, userId }, defaults: { seasonId, userId } });
  else await SeasonSubscription.destroy({ where: { seasonId, userId } });
  return on;
}

export async function subscriberCount(seasonId: number): Promise<number> {
  return SeasonSubscription.count({ where: { seasonId } });
}

const WHAT_NOW: Record<SeasonState, (s: Season) => string> = {
  draft: () => 'The season is back in preparation.',
  open: (s) => `Entries are open until ${formatDateTime(s.closesAt, s.timeZone)}. Read the rulebook before you print.`,
  judging: () => 'Entries are closed; the judges are reviewing the submitted prints.',
  final: () => 'The final standings are published and will not change.',
  archived: () => 'The season is archived; its final standings stay readable.',
};

/** One mail per subscriber; returns how many were sent. */
export async function notifySubscribers(season: Season, note: string): Promise<number> {
  const subs = await SeasonSubscription.findAll({ where: { seasonId: season.id }, include: [{ model: User, attributes: ['email', 'name'] }] });
  let sent = 0;
  for (const sub of subs) {
    const user = (sub as unknown as { User: User | null }).User;
    if (!user) continue;
    const intro = `Hello ${user.name}, ${season.name} is now ${season.state}. ${WHAT_NOW[season.state as SeasonState](season)}${note ? `\n\n${note}` : ''}`;
    await sendMail(linkMail(user.email, `${season.name} is now ${season.state}`, intro, 'See the season', appUrl(`/seasons/${season.slug}`), 'You get this because you subscribed to this season’s announcements; unsubscribe on the season page.'));
    sent += 1;
  }
  return sent;
}
