import { requirePageRole } from '@/lib/auth/guard';
import { listUsers } from '@/lib/admin';
import { RoleEditor } from './RoleEditor';
import { formatDate } from '@/lib/format';

export const metadata = { title: 'Users' };

export default async function UsersPage() {
  await requirePageRole('/admin/users', 'admin');
  const users = await listUsers();
  return (
    <div className="space-y-6">
      <h1>Users</h1>
      <section className="card overflow-x-auto">
        <table className="table">
          <thead><tr><th>Name</th><th>E-mail</th><th>Confirmed</th><th>Joined</th><th>Roles</th></tr></thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id} data-testid={`user-${u.email}`}>
                <td>{u.name}</td><td>{u.email}</td><td>{u.emailVerified ? 'yes' : 'no'}</td><td>{formatDate(u.createdAt)}</td>
                <td><RoleEditor userId={u.id} userName={u.name} initial={u.roles} /></td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
