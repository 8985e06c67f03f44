import { route, parseInput } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { reviewQueue, QueueFilterSchema } from '@/lib/reviews/queue';

/** GET /api/judging/queue?view=waiting|decided&season=&class=&flag=&sort=&q=&page= — the judge's queue, one page (lib/reviews/queue.ts). */
export const GET = route(async (req) => {
  const judge = await requireRole('judge');
  const filter = parseInput(QueueFilterSchema, Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await reviewQueue(judge.id, filter));
});
