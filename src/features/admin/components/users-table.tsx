import { format } from 'date-fns';
import type { UserRecord } from '../../../../shared/admin';
import { roleCodes, roleLabels, type RoleCode } from '../../../../shared/auth';
import { errorMessage } from '../../../components/ui/status';
import { useUpdateUser } from '../api/update-user';

/** Said before disabling, because the server ends sessions and stops tokens at once. */
function disableWarning(name: string): string {
  return `Disable ${name}? They are signed out on every device now, and re-enabling does not sign them back in. API tokens they created stop working until they are enabled again or you hand the tokens to another administrator on the tokens page.`;
}

export function UsersTable({ users, selfId }: { users: UserRecord[]; selfId: number }) {
  const update = useUpdateUser();
  return (
    <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">People with access to Ballast</caption>
        <thead className="bg-ink-50 text-left text-ink-700">
          <tr>
            <th scope="col" className="px-4 py-2">
              Person
            </th>
            <th scope="col" className="px-4 py-2">
              Role
            </th>
            <th scope="col" className="px-4 py-2">
              Last sign-in
            </th>
            <th scope="col" className="px-4 py-2">
              State
            </th>
          </tr>
        </thead>
        <tbody>
          {users.map((user) => (
            <tr key={user.id} className="border-t border-ink-100">
              <td className="px-4 py-2">
                <div className="font-semibold text-ink-900">{user.name}</div>
                <div className="text-ink-500">{user.email}</div>
              </td>
              <td className="px-4 py-2">
                <select
                  aria-label={`Role of ${user.name}`}
                  value={user.role}
                  disabled={user.id === selfId || update.isPending}
                  className="rounded-md border border-ink-200 bg-white px-2 py-1"
                  onChange={(e) => update.mutate({ id: user.id, role: e.target.value as RoleCode })}
                >
                  {roleCodes.map((role) => (
                    <option key={role} value={role}>
                      {roleLabels[role]}
                    </option>
                  ))}
                </select>
              </td>
              <td className="px-4 py-2 text-ink-500">
                {user.lastLoginAt ? format(new Date(user.lastLoginAt), 'd MMM yyyy, HH:mm') : 'Never'}
              </td>
              <td className="px-4 py-2">
                <div className="flex flex-wrap items-center gap-2">
                  <label className="inline-flex items-center gap-1.5">
                    <input
                      type="checkbox"
                      checked={user.active}
                      disabled={user.id === selfId || update.isPending}
                      onChange={(e) => {
                        const active = e.target.checked;
                        if (!active && !window.confirm(disableWarning(user.name))) return;
                        update.mutate({ id: user.id, active });
                      }}
                    />
                    Active
                  </label>
                  {user.lockedUntil ? (
                    <button
                      type="button"
                      className="rounded bg-brass-100 px-2 py-0.5 text-xs font-semibold text-brass-700"
                      onClick={() => update.mutate({ id: user.id, unlock: true })}
                    >
                      Locked until {format(new Date(user.lockedUntil), 'HH:mm')} · unlock
                    </button>
                  ) : null}
                </div>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {update.error ? (
        <p role="alert" className="px-4 py-2 text-sm text-coral-500">
          {errorMessage(update.error)}
        </p>
      ) : null}
    </div>
  );
}
