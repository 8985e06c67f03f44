'use server';
/** Subscribe to / unsubscribe from a season's announcement mails (signed-in people only). */
import { redirect } from 'next/navigation';
import { revalidatePath } from 'next/cache';
import { Op } from 'sequelize';
import { Season } from '@/models';
import { currentUser } from '@/lib/auth/guard';
import { setSubscription } from '@/lib/seasons/subscriptions';

export async function toggleSubscription(formData: FormData) {
  const slug = String(formData.get('slug') ?? '');
  const back = String(formData.get('back') ?? '');
  const returnTo = back.startsWith(`/seasons/${slug}`) && !back.includes('//') ? back : `/seasons/${slug}`;
  const user = await currentUser();
  if (!user) redirect(`/signin?callbackUrl=${encodeURIComponent(returnTo)}`);
  const season = await Season.findOne({ where: { slug, state: { [Op.ne]: 'draft' } } });
  if (!season) redirect('/seasons');
  await setSubscription(season.id, user.id, formData.get('on') === '1');
  revalidatePath(returnTo);
  redirect(returnTo);
}
