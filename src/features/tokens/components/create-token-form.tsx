import { useState, type FormEvent } from 'react';
import type { CategorySummary } from '../../../../shared/auth';
import { roleLabels } from '../../../../shared/auth';
import {
  createTokenSchema,
  tokenRoles,
  type CreatedToken,
  type TokenRole,
} from '../../../../shared/schemas/tokens.schema';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useCreateToken } from '../api/create-token';

const field = 'mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2 text-sm';

function SecretOnce({ created, onDone }: { created: CreatedToken; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  const copy = async () => {
    await navigator.clipboard.writeText(created.secret);
    setCopied(true);
  };
  return (
    <div
      role="status"
      className="rounded-lg border-l-4 border-brass-500 bg-brass-100/70 p-4 text-sm text-ink-900"
    >
      <p className="font-semibold">
        Token “{created.token.name}” created. Copy its secret now: Ballast will not show it again.
      </p>
      <div className="mt-3 flex flex-wrap items-center gap-2">
        <code
          aria-label="Token secret"
          className="rounded-md bg-white px-3 py-2 font-mono text-sm break-all ring-1 ring-ink-200 select-all"
        >
          {created.secret}
        </code>
        <Button variant="secondary" onClick={() => void copy()}>
          {copied ? 'Copied' : 'Copy'}
        </Button>
        <Button variant="quiet" onClick={onDone}>
          I have stored it
        </Button>
      </div>
      <p className="mt-2 text-ink-700">
        Send it as <code className="font-mono">Authorization: Bearer …</code>. Anyone holding it can write
        data within its role and categories until it is revoked.
      </p>
    </div>
  );
}

export function CreateTokenForm({ categories }: { categories: CategorySummary[] }) {
  const create = useCreateToken();
  const [name, setName] = useState('');
  const [role, setRole] = useState<TokenRole>('ops');
  const [selected, setSelected] = useState<number[]>([]);
  const [problem, setProblem] = useState<string | null>(null);

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const input = { name, role, categoryIds: selected.length ? selected : null };
    const checked = createTokenSchema.safeParse(input);
    if (!checked.success) {
      setProblem(checked.error.issues[0]?.message ?? 'Check the form.');
      return;
    }
    setProblem(null);
    create.mutate(input, {
      onSuccess: () => {
        setName('');
        setSelected([]);
      },
    });
  };

  if (create.data) return <SecretOnce created={create.data} onDone={() => create.reset()} />;

  return (
    <form
      onSubmit={submit}
      noValidate
      aria-label="Create an API token"
      className="grid gap-4 rounded-lg border border-ink-100 bg-white p-5"
    >
      <div className="grid gap-3 sm:grid-cols-2">
        <div>
          <label htmlFor="token-name" className="text-sm font-semibold text-ink-800">
            Name
          </label>
          <input
            id="token-name"
            className={field}
            value={name}
            onChange={(e) => setName(e.target.value)}
            placeholder="What uses it, e.g. nightly review feed"
            autoComplete="off"
          />
        </div>
        <div>
          <label htmlFor="token-role" className="text-sm font-semibold text-ink-800">
            Acts as
          </label>
          <select
            id="token-role"
            className={field}
            value={role}
            onChange={(e) => setRole(e.target.value as TokenRole)}
          >
            {tokenRoles.map((r) => (
              <option key={r} value={r}>
                {roleLabels[r]}
              </option>
            ))}
          </select>
        </div>
      </div>
      <fieldset>
        <legend className="text-sm font-semibold text-ink-800">
          Limit to categories{' '}
          {role === 'manager' ? '(required for a category manager token)' : '(none ticked: all)'}
        </legend>
        <div className="mt-2 flex flex-wrap gap-2">
          {categories.map((c) => (
            <label
              key={c.id}
              className="flex items-center gap-2 rounded-md border border-ink-100 px-2.5 py-1.5 text-sm"
            >
              <input
                type="checkbox"
                checked={selected.includes(c.id)}
                onChange={(e) =>
                  setSelected((s) => (e.target.checked ? [...s, c.id] : s.filter((id) => id !== c.id)))
                }
                className="accent-ink-900"
              />
              {c.name}
            </label>
          ))}
        </div>
      </fieldset>
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={create.isPending}>
          Create token
        </Button>
        {problem || create.error ? (
          <p role="alert" className="text-sm text-coral-500">
            {problem ?? errorMessage(create.error)}
          </p>
        ) : null}
      </div>
    </form>
  );
}
