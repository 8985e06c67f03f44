import { currentUser, hasRole } from '@/lib/auth/guard';
import { reviewDenial } from '@/lib/reviews/access';
import { parseId } from '@/lib/ids';
import { DenialProvider } from '@/components/judging/ReviewForbidden';

/**
 * Wraps the review page so that its 403 screen (forbidden.tsx beside it) can give the real reason
 * — the judge's own entry, or a class they compete in — instead of the generic role sentence.
 */
export default async function ReviewLayout({ children, params }: { children: React.ReactNode; params: Promise<{ id: string }> }) {
  const { id } = await params;
  const user = await currentUser();
  const entryId = parseId(id);
  const reason = user && entryId !== null && hasRole(user, ['judge']) ? await reviewDenial(user.id, entryId) : null;
  return <DenialProvider reason={reason}>{children}</DenialProvider>;
}
