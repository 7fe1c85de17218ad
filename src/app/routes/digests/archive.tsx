import { useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useMe } from '../../../features/auth/api/get-me';
import { useCategories } from '../../../features/categories/api/get-categories';
import { useCategoryDigests } from '../../../features/digests/api/get-category-digests';
import { usePortfolioDigests } from '../../../features/digests/api/get-portfolio-digests';
import { DigestPreview } from '../../../features/digests/components/digest-preview';
import { DigestTimeline } from '../../../features/digests/components/digest-timeline';

const PORTFOLIO = '__portfolio';

export function Component() {
  const me = useMe();
  const categories = useCategories();
  const [params, setParams] = useSearchParams();
  const canPortfolio = !!me.data && me.data.role !== 'manager';
  const chosen = params.get('category') ?? (canPortfolio ? PORTFOLIO : (categories.data?.[0]?.slug ?? ''));
  const isPortfolio = chosen === PORTFOLIO;
  const category = useCategoryDigests(isPortfolio ? '' : chosen);
  const portfolio = usePortfolioDigests(isPortfolio && canPortfolio);
  const list = isPortfolio ? portfolio : category;
  const [selected, setSelected] = useState<number | undefined>(undefined);
  const digest = list.data?.find((d) => d.id === selected) ?? list.data?.[0];
  const name = isPortfolio ? 'Portfolio' : (categories.data?.find((c) => c.slug === chosen)?.name ?? chosen);
  // A link to a category the list does not hold (not one of the reader's): show that it is the one asked for.
  const listed = isPortfolio ? canPortfolio : (categories.data ?? []).some((c) => c.slug === chosen);

  return (
    <>
      <PageHeader
        title="Digests"
        lead="Every weekly digest Ballast has made: read it here, or download the PDF that went out by mail."
      />
      <label className="mb-4 block text-sm font-semibold text-ink-800">
        Digest of
        <select
          className="ml-2 rounded-md border border-ink-200 bg-white px-2 py-1 font-normal"
          value={chosen}
          onChange={(e) => {
            setSelected(undefined);
            setParams({ category: e.target.value });
          }}
        >
          {!listed && chosen && categories.data ? (
            <option value={chosen} disabled>
              {chosen}
            </option>
          ) : null}
          {canPortfolio ? <option value={PORTFOLIO}>Portfolio (every category)</option> : null}
          {(categories.data ?? []).map((c) => (
            <option key={c.slug} value={c.slug}>
              {c.name}
            </option>
          ))}
        </select>
      </label>
      {list.isPending && list.fetchStatus !== 'idle' ? <Loading label="Loading digests…" /> : null}
      {list.isError ? <ErrorPanel error={list.error} onRetry={() => void list.refetch()} /> : null}
      {list.data && list.data.length === 0 ? (
        <EmptyState title="No digest yet">
          Digests appear after a schedule that produces “Snapshot + digest” has run for this week.
        </EmptyState>
      ) : null}
      {list.data && digest ? (
        <div className="grid gap-6 lg:grid-cols-[18rem_1fr]">
          <DigestTimeline digests={list.data} selected={digest.id} onSelect={setSelected} />
          <DigestPreview digest={digest} title={`${name} · ${digest.isoWeek}`} />
        </div>
      ) : null}
      <Caution />
    </>
  );
}
