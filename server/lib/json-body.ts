import express, { type Request, type Response } from 'express';

/** The largest JSON body any route accepts; a larger one is answered 413. */
export const JSON_BODY_LIMIT = '10mb';

/** Parses a JSON body on the event loop: for the small bodies of ordinary routes. */
export const jsonBody = express.json({ limit: JSON_BODY_LIMIT });

const rawJsonBody = express.raw({ type: 'application/json', limit: JSON_BODY_LIMIT });

/**
 * Reads a JSON body as bytes (same content type, size limit and 413 as `jsonBody`) without parsing it, for
 * a worker thread to parse (workers/json-body.ts). Null when the request carries no JSON body.
 */
export async function readJsonBytes(req: Request, res: Response): Promise<Uint8Array | null> {
  await new Promise<void>((resolve, reject) =>
    rawJsonBody(req, res, (err?: unknown) => (err ? reject(err) : resolve())),
  );
  return Buffer.isBuffer(req.body) ? (req.body as Buffer) : null;
}
