import type { Migration } from '../server/db/migrator';

/** The alert check after an import finds the categories the import touched through its reviews. */
export const up: Migration = async ({ context: qi }) => {
  await qi.addIndex('reviews', ['import_batch_id'], { name: 'reviews_import_batch' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeIndex('reviews', 'reviews_import_batch');
};
