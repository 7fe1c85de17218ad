import type { Migration } from '../server/db/migrator';

// Every column the weekly aggregates read except the review text, so a snapshot scans an index, not rows.
export const up: Migration = async ({ context: qi }) => {
  await qi.addIndex(
    'reviews',
    ['item_id', 'reviewed_at', 'stars', 'helpful_yes', 'helpful_no', 'reviewer_score'],
    {
      name: 'reviews_item_evidence',
    },
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeIndex('reviews', 'reviews_item_evidence');
};
