export type FlagCode = 'stale' | 'thin' | 'cluster' | 'mover';

export const flagLabels: Record<FlagCode, { short: string; explain: string; tone: string }> = {
  stale: {
    short: 'Stale',
    explain: "The newest review is older than the category's staleness threshold.",
    tone: 'bg-ink-100 text-ink-800 ring-ink-300',
  },
  thin: {
    short: 'Thin',
    explain: "Fewer reviews than the category's thin-evidence threshold: the raw mean rests on little.",
    tone: 'bg-brass-100 text-brass-700 ring-brass-300',
  },
  cluster: {
    short: '1★ cluster',
    explain:
      "Recent one-star reviews are improbably many against the item's own baseline: a reason to read them.",
    tone: 'bg-coral-100 text-coral-500 ring-coral-500/40',
  },
  mover: {
    short: 'Mover',
    explain: 'Moved more places than the mover threshold since the week before.',
    tone: 'bg-kelp-500/10 text-kelp-500 ring-kelp-500/40',
  },
};

/** A short flag label; the reason (or the general explanation) is its tooltip and its accessible name. */
export function FlagBadge({ flag, reason }: { flag: FlagCode; reason?: string | null }) {
  const { short, explain, tone } = flagLabels[flag];
  const text = reason ? `${short}: ${reason}` : `${short}: ${explain}`;
  return (
    <span
      title={text}
      aria-label={text}
      className={`inline-flex items-center rounded px-1.5 py-0.5 text-[11px] font-bold uppercase tracking-wide ring-1 ${tone}`}
    >
      {short}
    </span>
  );
}
