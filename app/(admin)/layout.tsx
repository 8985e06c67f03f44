import { requirePageRole } from '@/lib/auth/guard';

/**
 * Every page of this group is for the admin role: checked here, outside the group's loading.tsx
 * boundary, so a signed-in visitor without the role gets a real 403 status (a page inside a loading
 * boundary streams with 200 before it can refuse). Each page checks again with its own address.
 */
export default async function RoleLayout({ children }: { children: React.ReactNode }) {
  await requirePageRole('/admin/users', 'admin');
  return children;
}
