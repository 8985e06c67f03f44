import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { judgeQueue } from '@/lib/queries';

export const GET = route(async () => {
  const judge = await requireRole('judge');
  return Response.json(await judgeQueue(judge.id));
});
