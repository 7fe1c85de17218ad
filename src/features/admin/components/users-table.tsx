import { format } from 'date-fns';
import { Fragment, useState, type FormEvent, type ReactNode } from 'react';
import { updateUserSchema, type UserRecord } from '../../../../shared/admin';
import { roleCodes, roleLabels, type RoleCode } from '../../../../shared/auth';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useUpdateUser } from '../api/update-user';

type Open = { id: number; action: 'disable' | 'password' } | null;

/**
 * Said before disabling, because the server ends sessions and stops tokens at once. `disableDetails` is
 * composed in by the page: the tokens the person answers for, and the way to hand them over.
 */
function DisablePanel({
  user,
  details,
  busy,
  onConfirm,
  onCancel,
}: {
  user: UserRecord;
  details: ReactNode;
  busy: boolean;
  onConfirm: () => void;
  onCancel: () => void;
}) {
  const headingId = `disable-${user.id}-heading`;
  return (
    <section
      aria-labelledby={headingId}
      className="space-y-3 rounded-md border border-brass-300 bg-brass-100/60 p-4 text-sm text-ink-800"
    >
      <h3 id={headingId} className="font-bold text-ink-900">
        Disable {user.name}?
      </h3>
      <p>
        {user.name} is signed out on every device at once and cannot sign in while disabled. Enabling them
        again does not bring those sessions back: they sign in anew.
      </p>
      {details}
      <div className="flex flex-wrap gap-2">
        <Button variant="danger" disabled={busy} onClick={onConfirm}>
          Disable {user.name}
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Keep {user.name} active
        </Button>
      </div>
    </section>
  );
}

function PasswordPanel({
  user,
  busy,
  onSave,
  onCancel,
}: {
  user: UserRecord;
  busy: boolean;
  onSave: (password: string) => void;
  onCancel: () => void;
}) {
  const [password, setPassword] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const inputId = `password-${user.id}`;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const checked = updateUserSchema.safeParse({ password });
    if (!checked.success) {
      setProblem(checked.error.issues[0]?.message ?? 'Choose another password.');
      return;
    }
    setProblem(null);
    onSave(password);
  };
  return (
    <form
      onSubmit={submit}
      noValidate
      aria-label={`New password for ${user.name}`}
      className="space-y-3 rounded-md border border-ink-200 bg-ink-50 p-4 text-sm text-ink-800"
    >
      <p>
        Setting a new password signs {user.name} out on every device: each session they have open ends, and
        they sign in again with the new password.
      </p>
      <div>
        <label htmlFor={inputId} className="font-semibold text-ink-800">
          New password for {user.name}
        </label>
        <input
          id={inputId}
          type="password"
          autoComplete="new-password"
          value={password}
          aria-invalid={problem ? true : undefined}
          onChange={(e) => setPassword(e.target.value)}
          className="mt-1 block w-full max-w-sm rounded-md border border-ink-200 bg-white px-3 py-2 text-sm"
        />
        {problem ? <p className="mt-1 text-xs text-coral-500">{problem}</p> : null}
      </div>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={busy}>
          Set password and sign {user.name} out
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

export function UsersTable({
  users,
  selfId,
  disableDetails,
}: {
  users: UserRecord[];
  selfId: number;
  /** What else stops when this person is disabled (their API tokens), shown before the admin confirms. */
  disableDetails?: (user: UserRecord) => ReactNode;
}) {
  const update = useUpdateUser();
  const [open, setOpen] = useState<Open>(null);
  const [done, setDone] = useState<string | null>(null);
  const close = () => setOpen(null);
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
          {users.map((user) => {
            const self = user.id === selfId;
            const panel = open?.id === user.id ? open.action : null;
            return (
              <Fragment key={user.id}>
                <tr className="border-t border-ink-100 align-top">
                  <td className="px-4 py-2">
                    <div className="font-semibold text-ink-900">{user.name}</div>
                    <div className="break-all text-ink-500">{user.email}</div>
                  </td>
                  <td className="px-4 py-2">
                    <select
                      aria-label={`Role of ${user.name}`}
                      value={user.role}
                      disabled={self || update.isPending}
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
                          aria-expanded={user.active ? panel === 'disable' : undefined}
                          disabled={self || update.isPending}
                          onChange={(e) => {
                            setDone(null);
                            if (e.target.checked) update.mutate({ id: user.id, active: true });
                            // Nothing changes yet: the panel says what disabling ends and asks to confirm.
                            else setOpen(panel === 'disable' ? null : { id: user.id, action: 'disable' });
                          }}
                        />
                        Active
                      </label>
                      {self ? null : (
                        <button
                          type="button"
                          aria-expanded={panel === 'password'}
                          className="rounded px-2 py-0.5 text-xs font-semibold text-ink-700 ring-1 ring-ink-200 hover:bg-ink-50"
                          onClick={() => {
                            setDone(null);
                            setOpen(panel === 'password' ? null : { id: user.id, action: 'password' });
                          }}
                        >
                          New password
                        </button>
                      )}
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
                {panel ? (
                  <tr>
                    <td colSpan={4} className="px-2 pb-4 sm:px-4">
                      {/* On a phone the table scrolls sideways; the panel stays in view at the screen's width. */}
                      <div className="sticky left-2 w-[calc(100vw-3.75rem)] sm:static sm:w-auto">
                        {panel === 'disable' ? (
                          <DisablePanel
                            user={user}
                            details={disableDetails?.(user)}
                            busy={update.isPending}
                            onCancel={close}
                            onConfirm={() =>
                              update.mutate(
                                { id: user.id, active: false },
                                {
                                  onSuccess: () => {
                                    close();
                                    setDone(`${user.name} is disabled and signed out on every device.`);
                                  },
                                },
                              )
                            }
                          />
                        ) : (
                          <PasswordPanel
                            user={user}
                            busy={update.isPending}
                            onCancel={close}
                            onSave={(password) =>
                              update.mutate(
                                { id: user.id, password },
                                {
                                  onSuccess: () => {
                                    close();
                                    setDone(`New password set; ${user.name} was signed out on every device.`);
                                  },
                                },
                              )
                            }
                          />
                        )}
                      </div>
                    </td>
                  </tr>
                ) : null}
              </Fragment>
            );
          })}
        </tbody>
      </table>
      {done ? (
        <p role="status" className="border-t border-ink-100 px-4 py-2 text-sm text-ink-700">
          {done}
        </p>
      ) : null}
      {update.error ? (
        <p role="alert" className="px-4 py-2 text-sm text-coral-500">
          {errorMessage(update.error)}
        </p>
      ) : null}
    </div>
  );
}
