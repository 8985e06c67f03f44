import { route } from '@/lib/http';
import { requireUser } from '@/lib/auth/guard';

export const GET = route(async () => {
  const user = await requireUser();
  return Response.json({ id: user.id, name: user.name, email: user.email, roles: user.roles });
});
