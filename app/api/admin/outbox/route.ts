import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { listOutbox } from '@/lib/admin';
import { outboxBodiesVisible } from '@/lib/mail';

export const GET = route(async (req) => {
  await requireRole('admin');
  const to = new URL(req.url).searchParams.get('to') ?? undefined;
  const visible = outboxBodiesVisible();
  const messages = (await listOutbox({ to })).map((m) => (visible ? m : { ...m, text: null, html: null }));
  return Response.json({ bodiesShown: visible, messages });
});
