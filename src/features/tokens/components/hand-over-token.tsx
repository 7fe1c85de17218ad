import { useId, useState } from 'react';
import type { ApiTokenRecord } from '../../../../shared/schemas/tokens.schema';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useReassignToken } from '../api/reassign-token';

/** Someone who may take a token over: an active administrator (the server refuses anyone else). */
export type TokenKeeper = { id: number; name: string };

/**
 * Hands one token to another administrator, who answers for it from then on. The token keeps its secret,
 * role and categories, so the scripts using it go on working.
 */
export function HandOverToken({
  token,
  keepers,
  onDone,
}: {
  token: ApiTokenRecord;
  keepers: TokenKeeper[];
  onDone?: (token: ApiTokenRecord, keeper: TokenKeeper) => void;
}) {
  const reassign = useReassignToken();
  const choices = keepers.filter((k) => k.id !== token.createdById);
  const [keeperId, setKeeperId] = useState<number | ''>('');
  const selectId = useId();
  if (choices.length === 0)
    return (
      <p className="text-xs text-ink-500">
        No other active administrator can take it; enable one, or revoke the token.
      </p>
    );
  return (
    <div className="flex flex-wrap items-center gap-2">
      <label htmlFor={selectId} className="sr-only">
        Hand “{token.name}” to
      </label>
      <select
        id={selectId}
        value={keeperId}
        disabled={reassign.isPending}
        className="min-w-0 max-w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm"
        onChange={(e) => setKeeperId(e.target.value === '' ? '' : Number(e.target.value))}
      >
        <option value="">Hand to…</option>
        {choices.map((k) => (
          <option key={k.id} value={k.id}>
            {k.name}
          </option>
        ))}
      </select>
      <Button
        variant="secondary"
        disabled={keeperId === '' || reassign.isPending}
        aria-label={`Hand over “${token.name}”`}
        onClick={() => {
          const keeper = choices.find((k) => k.id === keeperId);
          if (!keeper) return;
          reassign.mutate(
            { id: token.id, userId: keeper.id },
            {
              onSuccess: (moved) => {
                setKeeperId('');
                onDone?.(moved, keeper);
              },
            },
          );
        }}
      >
        Hand over
      </Button>
      {reassign.error ? (
        <p role="alert" className="w-full text-xs text-coral-500">
          {errorMessage(reassign.error)}
        </p>
      ) : null}
    </div>
  );
}

/**
 * What disabling a person does to the API tokens they answer for: each one is named, and each can be handed
 * to another administrator first so that it keeps working.
 */
export function TokensOfCreator({
  creatorName,
  tokens,
  keepers,
}: {
  creatorName: string;
  /** Tokens this person answers for, revoked ones included (they are left out here). */
  tokens: ApiTokenRecord[];
  keepers: TokenKeeper[];
}) {
  const [handed, setHanded] = useState<string[]>([]);
  const live = tokens.filter((t) => !t.revokedAt);
  return (
    <div className="space-y-2">
      {live.length === 0 ? (
        <p>{creatorName} answers for no API token in use, so no script stops.</p>
      ) : (
        <>
          <p>
            {live.length === 1
              ? 'This API token they created stops working while they are disabled:'
              : `These ${live.length} API tokens they created stop working while they are disabled:`}
          </p>
          <ul aria-label={`API tokens that stop with ${creatorName}`} className="space-y-2">
            {live.map((t) => (
              <li
                key={t.id}
                className="flex flex-col gap-2 rounded-md border border-brass-100 bg-white px-3 py-2 sm:flex-row sm:items-center sm:justify-between"
              >
                <span>
                  <span className="font-semibold text-ink-900">{t.name}</span>{' '}
                  <span className="font-mono text-xs text-ink-500">{t.prefix}…</span>
                </span>
                <HandOverToken
                  token={t}
                  keepers={keepers}
                  onDone={(moved, keeper) =>
                    setHanded((list) => [
                      ...list,
                      `“${moved.name}” now answers to ${keeper.name} and keeps working.`,
                    ])
                  }
                />
              </li>
            ))}
          </ul>
          <p className="text-xs text-ink-500">
            Hand a token over to keep it working; a token left with {creatorName} works again only when they
            are enabled again.
          </p>
        </>
      )}
      {handed.length > 0 ? (
        <ul role="status" className="space-y-1 text-sm text-ink-700">
          {handed.map((line) => (
            <li key={line}>{line}</li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}
