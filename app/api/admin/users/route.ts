import { route } from '@/lib/http';
import { requireRole } from '@/lib/auth/guard';
import { listUsers } from '@/lib/admin';

export const GET = route(async () => {
  await requireRole('admin');
  return Response.json({ users: await listUsers() });
});
