import { copyFile, mkdtemp, readFile, rm, stat, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { syntheticReviewRows, writeReviewCsv } from '../../../server/demo/scenario-csv';
import { ImportBatch } from '../../../server/db/models';
import {
  ensureUploadDir,
  importFileNow,
  importsIdle,
  resumeImports,
} from '../../../server/modules/imports/imports.service';
import { claimImport } from '../../../server/modules/imports/import-leases';
import { chunkRows } from '../../../server/modules/imports/imports.writer';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let dir: string;
let file: string;
const total = Math.round(chunkRows * 2.25);

beforeAll(async () => {
  t = await setupTestApp();
  dir = await mkdtemp(path.join(tmpdir(), 'ballast-resume-'));
  file = path.join(dir, 'reviews.csv');
  await writeReviewCsv(
    syntheticReviewRows(total, { asOf: new Date('2026-11-01T00:00:00Z'), seed: 99 }),
    file,
  );
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
  await t.close();
});

async function reviewCount(): Promise<number> {
  const row = (await t.db.sequelize.query(
    "SELECT COUNT(*) AS n FROM reviews WHERE external_id LIKE 'syn-%'",
    {
      plain: true,
    },
  )) as { n: number };
  return Number(row.n);
}

/** A batch as a server that stopped mid-import leaves it: running, counters of the chunks it committed. */
async function interruptedBatch(
  mode: 'valid_rows' | 'all_or_nothing',
  committed: number,
): Promise<ImportBatch> {
  const upload = path.join(ensureUploadDir(), `resume-${mode}-${Date.now()}.upload`);
  await copyFile(file, upload);
  return ImportBatch.create({
    kind: 'reviews',
    source: 'upload',
    mode,
    status: 'running',
    fileName: 'reviews.csv',
    filePath: upload,
    fileBytes: (await stat(upload)).size,
    fileSha256: null,
    rowsRead: committed,
    rowsAccepted: committed,
    rowsInserted: committed,
    bytesDone: 1,
    errorMessage: null,
    userId: null,
    tokenId: null,
    actorEmail: null,
    startedAt: new Date(),
    finishedAt: null,
  });
}

describe('resuming imports after a stop', () => {
  it('continues a "valid rows" import after its last committed chunk, without duplicates', async () => {
    // The first chunk went in before the stop (as its own committed transaction).
    const lines = (await readFile(file, 'utf8')).split('\n');
    const firstChunk = path.join(dir, 'first-chunk.csv');
    await writeFile(firstChunk, lines.slice(0, chunkRows + 1).join('\n') + '\n');
    const first = await importFileNow(firstChunk, 'reviews', 'valid_rows');
    expect(first.counters.rowsInserted).toBe(chunkRows);
    expect(await reviewCount()).toBe(chunkRows);

    const batch = await interruptedBatch('valid_rows', chunkRows);
    expect(await resumeImports(() => {})).toBe(1);
    await importsIdle();
    await batch.reload();
    expect(batch).toMatchObject({
      status: 'succeeded',
      rowsRead: total,
      rowsAccepted: total,
      rowsRejected: 0,
      rowsInserted: total,
      rowsUpdated: 0,
    });
    expect(Number(batch.bytesDone)).toBe(Number(batch.fileBytes));
    expect(await reviewCount()).toBe(total);
    await expect(stat(batch.filePath!)).rejects.toThrow();
  });

  it('starts an "all or nothing" import over (its transaction was rolled back), and re-applying changes nothing', async () => {
    const batch = await interruptedBatch('all_or_nothing', 0);
    await resumeImports(() => {});
    await importsIdle();
    await batch.reload();
    expect(batch).toMatchObject({ status: 'succeeded', rowsRead: total, rowsInserted: 0, rowsUpdated: 0 });
    expect(await reviewCount()).toBe(total);
  });

  it('marks an import failed with the reason when its upload is gone', async () => {
    const batch = await interruptedBatch('valid_rows', 0);
    await rm(batch.filePath!, { force: true });
    await resumeImports(() => {});
    await batch.reload();
    expect(batch.status).toBe('failed');
    expect(batch.errorMessage).toContain('its file is no longer there');
  });

  it('leaves an import to the live server holding its lease, and takes it up once that lease has run out', async () => {
    const batch = await interruptedBatch('valid_rows', 0);
    const other = 'another-app-server:4242:ab12cd34';
    await batch.update({ leaseOwner: other, leaseUntil: new Date(Date.now() + 60_000) });
    expect(await resumeImports(() => {})).toBe(0);
    await batch.reload();
    expect(batch).toMatchObject({ status: 'running', leaseOwner: other, errorMessage: null });

    // That server stopped: its lease is not renewed and runs out.
    await batch.update({ leaseUntil: new Date(Date.now() - 1_000) });
    expect(await resumeImports(() => {})).toBe(1);
    await importsIdle();
    await batch.reload();
    expect(batch).toMatchObject({ status: 'succeeded', rowsRead: total, leaseOwner: null, leaseUntil: null });
  });

  it('fails an import whose upload is on another server only after that server has stopped', async () => {
    const batch = await interruptedBatch('valid_rows', 0);
    await rm(batch.filePath!, { force: true });
    await batch.update({
      leaseOwner: 'another-app-server:7:ffff0000',
      leaseUntil: new Date(Date.now() + 60_000),
    });
    await resumeImports(() => {});
    expect((await batch.reload()).status).toBe('running');
    await batch.update({ leaseUntil: new Date(Date.now() - 1_000) });
    await resumeImports(() => {});
    expect((await batch.reload()).status).toBe('failed');
  });

  it('gives an expired import to exactly one of two servers claiming it at once', async () => {
    const batch = await interruptedBatch('valid_rows', 0);
    await batch.update({ leaseOwner: 'gone-server:1:00000000', leaseUntil: new Date(Date.now() - 1_000) });
    const won = await Promise.all([
      claimImport(batch.id, 'server-a:1:aaaa'),
      claimImport(batch.id, 'server-b:2:bbbb'),
    ]);
    expect(won.filter(Boolean)).toHaveLength(1);
    await batch.reload();
    expect(batch.leaseOwner).toBe(won[0] ? 'server-a:1:aaaa' : 'server-b:2:bbbb');
    await batch.update({ status: 'failed', leaseOwner: null, leaseUntil: null });
    await rm(batch.filePath!, { force: true });
  });
});
