import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { listOutbox } from '@/lib/admin';

export const GET = route(async (req) => {
  await requireRole('admin');
  const to = new URL(req.url).searchParams.get('to') ?? undefined;
  return Response.json({ messages: await listOutbox({ to }) });
});
