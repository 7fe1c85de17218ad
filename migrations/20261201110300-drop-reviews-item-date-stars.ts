import type { Migration } from '../server/db/migrator';

// reviews_item_evidence starts with the same columns, so this narrower index only costs writes.
export const up: Migration = async ({ context: qi }) => {
  await qi.removeIndex('reviews', 'reviews_item_date_stars');
};

export const down: Migration = async ({ context: qi }) => {
  await qi.addIndex('reviews', ['item_id', 'reviewed_at', 'stars'], { name: 'reviews_item_date_stars' });
};
