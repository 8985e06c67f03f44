import type { Role } from '@/lib/domain';

declare module 'next-auth' {
  interface Session {
    user?: { id: number; name: string; email: string; roles: Role[] };
  }
}
