import { QueryTypes, type Sequelize } from 'sequelize';
import { keyOf } from '../shared/keys';
import type { Migration } from '../server/db/migrator';

/*
 * Keys compare exactly (shared/keys.ts): the key columns move from the database's case- and accent-blind
 * default collation to utf8mb4_bin, and stored keys are put in key form (NFC, trimmed). One migration for
 * the four columns because the check must see them all before any is changed: a key that would become
 * equal to another one in its unique scope stops the migration with a list, and nothing is changed.
 */

type KeyColumn = {
  table: string;
  column: string;
  length: number;
  nullable: boolean;
  /** Columns that, with this one, form a unique key; null: no unique key. */
  scope: string[] | null;
};

export const keyColumns: KeyColumn[] = [
  { table: 'categories', column: 'slug', length: 80, nullable: false, scope: [] },
  { table: 'items', column: 'sku', length: 120, nullable: false, scope: ['category_id'] },
  { table: 'reviews', column: 'external_id', length: 128, nullable: false, scope: ['item_id'] },
  { table: 'reviews', column: 'reviewer_external_id', length: 128, nullable: true, scope: null },
];

type Row = { id: number | string; value: string; scope: string };
const pageSize = 10_000;

/** Rows whose stored key is not in key form (few or none: the importer always trimmed). */
async function unnormalised(sequelize: Sequelize, c: KeyColumn): Promise<Row[]> {
  const scope = c.scope?.length ? `CONCAT_WS(',', ${c.scope.join(', ')})` : "''";
  const out: Row[] = [];
  for (let after: number | string = 0; ;) {
    const rows: Row[] = await sequelize.query<Row>(
      `SELECT id, ${c.column} AS value, ${scope} AS scope FROM ${c.table}
       WHERE id > :after AND ${c.column} IS NOT NULL ORDER BY id LIMIT ${pageSize}`,
      { replacements: { after }, type: QueryTypes.SELECT },
    );
    for (const r of rows) if (keyOf(r.value) !== r.value) out.push(r);
    if (rows.length < pageSize) return out;
    after = rows[rows.length - 1]!.id;
  }
}

/** Pairs of rows that would hold the same key within one unique scope once the keys are in key form. */
async function collisions(sequelize: Sequelize, c: KeyColumn, changing: Row[]): Promise<string[]> {
  if (!c.scope) return [];
  const found: string[] = [];
  const first = new Map<string, Row>();
  for (const r of changing) {
    const key = `${r.scope}\u0000${keyOf(r.value)}`;
    const other = first.get(key);
    if (other) found.push(describe(c, other, r));
    else first.set(key, r);
    const where = [`${c.column} COLLATE utf8mb4_bin = :key`, 'id <> :id'];
    c.scope.forEach((s, i) => where.push(`${s} = :s${i}`));
    const scopeValues = Object.fromEntries(r.scope.split(',').map((v, i) => [`s${i}`, v]));
    const same = await sequelize.query<Row>(
      `SELECT id, ${c.column} AS value, '' AS scope FROM ${c.table} WHERE ${where.join(' AND ')}`,
      { replacements: { key: keyOf(r.value), id: r.id, ...scopeValues }, type: QueryTypes.SELECT },
    );
    for (const s of same) found.push(describe(c, { ...s, scope: r.scope }, r));
  }
  return found;
}

function describe(c: KeyColumn, a: Row, b: Row): string {
  const within = c.scope?.length ? ` (${c.scope.join(', ')} ${a.scope})` : '';
  return `${c.table}.${c.column}${within}: id ${a.id} ${JSON.stringify(a.value)} and id ${b.id} ${JSON.stringify(b.value)}`;
}

async function convert(sequelize: Sequelize, c: KeyColumn, collation: string): Promise<void> {
  await sequelize.query(
    `ALTER TABLE ${c.table} MODIFY ${c.column} VARCHAR(${c.length}) CHARACTER SET utf8mb4 COLLATE ${collation} ${
      c.nullable ? 'NULL' : 'NOT NULL'
    }`,
  );
}

export const up: Migration = async ({ context: qi }) => {
  const sequelize = qi.sequelize;
  const changing = new Map<KeyColumn, Row[]>();
  const problems: string[] = [];
  for (const c of keyColumns) {
    const rows = await unnormalised(sequelize, c);
    changing.set(c, rows);
    problems.push(...(await collisions(sequelize, c, rows)));
  }
  if (problems.length > 0)
    throw new Error(
      `Keys now compare exactly after Unicode NFC and trimming, and these ${problems.length} pairs would ` +
        `become the same key. Nothing was changed. Rename or remove one of each pair, then start again:\n` +
        problems.map((p) => `  ${p}`).join('\n'),
    );
  for (const c of keyColumns) {
    await convert(sequelize, c, 'utf8mb4_bin');
    for (const r of changing.get(c) ?? [])
      await sequelize.query(`UPDATE ${c.table} SET ${c.column} = :key WHERE id = :id`, {
        replacements: { key: keyOf(r.value), id: r.id },
      });
  }
};

export const down: Migration = async ({ context: qi }) => {
  const sequelize = qi.sequelize;
  const problems: string[] = [];
  for (const c of keyColumns) {
    if (!c.scope) continue;
    const group = [...c.scope, `${c.column} COLLATE utf8mb4_unicode_ci`].join(', ');
    const rows = await sequelize.query<{ ids: string }>(
      `SELECT GROUP_CONCAT(id ORDER BY id) AS ids FROM ${c.table} GROUP BY ${group} HAVING COUNT(*) > 1`,
      { type: QueryTypes.SELECT },
    );
    for (const r of rows)
      problems.push(`${c.table}.${c.column}: ids ${r.ids} differ only in case or accents`);
  }
  if (problems.length > 0)
    throw new Error(
      `Going back to case-blind keys would merge these keys; nothing was changed:\n${problems.join('\n')}`,
    );
  for (const c of keyColumns) await convert(sequelize, c, 'utf8mb4_unicode_ci');
};
