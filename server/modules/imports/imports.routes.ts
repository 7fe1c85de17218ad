import { randomUUID } from 'node:crypto';
import { rm } from 'node:fs/promises';
import type { Request, Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import {
  importBatchSchema,
  importListQuerySchema,
  ingestAggregatesBodySchema,
  ingestResultSchema,
  ingestReviewsBodySchema,
  previewSchema,
  uploadFieldsSchema,
} from '../../../shared/schemas/imports-api.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import {
  ensureUploadDir,
  getImport,
  importErrorsCsv,
  importSettings,
  ingestRows,
  listImports,
  previewImport,
  startUpload,
} from './imports.service';

const importers = access.roles(['admin', 'ops', 'manager']);
const ingesters = access.roles(['admin', 'ops', 'manager'], { tokens: true });

/** Receives the multipart upload (field `file`) into a temporary file under the data directory. */
async function receiveFile(req: Request, res: Response): Promise<Express.Multer.File> {
  const { maxBytes } = importSettings();
  const dir = ensureUploadDir();
  const upload = multer({
    storage: multer.diskStorage({
      destination: dir,
      filename: (_req, _file, done) => done(null, `${randomUUID()}.upload`),
    }),
    limits: { fileSize: maxBytes, files: 1, fields: 10 },
    // Browsers send file names as UTF-8 without saying so.
    defParamCharset: 'utf8',
  }).single('file');
  try {
    await new Promise<void>((resolve, reject) =>
      upload(req, res, (err: unknown) => (err ? reject(err) : resolve())),
    );
  } catch (err) {
    if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE')
      throw new AppError(
        'payload_too_large',
        `The file is larger than the limit of ${Math.round(maxBytes / 1024 / 1024)} MB. Split it into smaller files and import each.`,
        413,
      );
    if (err instanceof multer.MulterError)
      throw new AppError('bad_request', `The upload could not be read: ${err.message}.`, 400);
    throw err;
  }
  if (!req.file) throw new AppError('bad_request', 'Choose a file to import (form field "file").', 400);
  return req.file;
}

function batchId(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw AppError.notFound('The import');
  return id;
}

export const importRoutes = [
  route({
    method: 'post',
    path: '/api/imports/preview',
    tag: 'imports',
    summary: 'Read the first rows of a file (multipart: file, kind) as the import would, writing nothing',
    access: importers,
    response: previewSchema,
    handler: async (req, res) => {
      const file = await receiveFile(req, res);
      try {
        const { kind } = uploadFieldsSchema.parse(req.body ?? {});
        return await previewImport(file.path, kind, req.actor!, file.originalname);
      } finally {
        await rm(file.path, { force: true });
      }
    },
  }),
  route({
    method: 'post',
    path: '/api/imports',
    tag: 'imports',
    summary: 'Start importing a file (multipart: file, kind, mode); it runs in the background',
    access: importers,
    response: importBatchSchema,
    status: 202,
    handler: async (req, res) => {
      const file = await receiveFile(req, res);
      const fields = uploadFieldsSchema.safeParse(req.body ?? {});
      if (!fields.success) {
        await rm(file.path, { force: true });
        throw fields.error;
      }
      return startUpload(
        req.actor!,
        { path: file.path, originalName: file.originalname, size: file.size },
        fields.data.kind,
        fields.data.mode,
      );
    },
  }),
  route({
    method: 'get',
    path: '/api/imports',
    tag: 'imports',
    summary: 'Import history, newest first (a category manager sees their own)',
    access: importers,
    query: importListQuerySchema,
    response: z.array(importBatchSchema),
    handler: (req, _res, { query }) => listImports(req.actor!, query.limit),
  }),
  route({
    method: 'get',
    path: '/api/imports/:id',
    tag: 'imports',
    summary: 'One import with its progress and counts',
    access: importers,
    response: importBatchSchema,
    handler: (req) => getImport(req.actor!, batchId(req.params.id)),
  }),
  route({
    method: 'get',
    path: '/api/imports/:id/errors.csv',
    tag: 'imports',
    summary: 'The rejected rows of an import as CSV: line, column, reason, raw',
    access: importers,
    handler: async (req, res) => {
      const id = batchId(req.params.id);
      const { csv, fileName } = await importErrorsCsv(req.actor!, id);
      res.setHeader('content-type', 'text/csv; charset=utf-8');
      res.setHeader('content-disposition', `attachment; filename="${fileName}"`);
      res.send(csv);
      return undefined;
    },
  }),
  route({
    method: 'post',
    path: '/api/ingest/reviews',
    tag: 'ingest',
    summary: 'Send up to 5,000 review rows; answers with the counts and every row error',
    access: ingesters,
    body: ingestReviewsBodySchema,
    response: ingestResultSchema,
    handler: async (req, res, { body }) => {
      const result = await ingestRows(req.actor!, 'reviews', body.mode, body.rows);
      if (result.status !== 'succeeded') res.status(422);
      return result;
    },
  }),
  route({
    method: 'post',
    path: '/api/ingest/aggregates',
    tag: 'ingest',
    summary: 'Send up to 5,000 aggregate observations; answers with the counts and every row error',
    access: ingesters,
    body: ingestAggregatesBodySchema,
    response: ingestResultSchema,
    handler: async (req, res, { body }) => {
      const result = await ingestRows(req.actor!, 'aggregates', body.mode, body.rows);
      if (result.status !== 'succeeded') res.status(422);
      return result;
    },
  }),
];
