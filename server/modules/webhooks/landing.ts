import type { Server } from 'node:http';
import express from 'express';
import { QueryTypes } from 'sequelize';
import type { LandingReceipt } from '../../../shared/schemas/alerts.schema';
import { Webhook } from '../../db/models';
import { db } from '../../db/sequelize';
import { logger } from '../../lib/logger';
import {
  eventHeader,
  signatureHeader,
  timestampHeader,
  verdictText,
  verifySignature,
  type Verdict,
} from './webhook-signature';

/**
 * The Landing: Ballast's own webhook receiver on loopback, standing in for a chat or incident service so a
 * newcomer sees signed deliveries arrive with nothing outside the machine. It accepts POSTs to any path,
 * checks the signature with the secret of the webhook registered for that address (as a real receiver
 * would with the secret pasted into it), keeps every request in landing_receipts, and answers 200 for a
 * verified one (a repeat of an event included, marked as such) and 401 otherwise.
 */
export type Landing = { port: number; close: () => Promise<void> };

const loopback = new Set(['127.0.0.1', 'localhost', '[::1]']);

async function secretsFor(port: number, path: string): Promise<string[]> {
  const hooks = await Webhook.findAll({ attributes: ['url', 'secret'] });
  return hooks
    .filter((h) => {
      try {
        const u = new URL(h.url);
        return loopback.has(u.hostname) && Number(u.port || 80) === port && u.pathname === path;
      } catch {
        return false;
      }
    })
    .map((h) => h.secret);
}

const header = (v: string | string[] | undefined): string | undefined => (Array.isArray(v) ? v[0] : v);

export async function startLanding(options: {
  port: number;
  host?: string;
  now?: () => Date;
}): Promise<Landing> {
  const app = express();
  app.disable('x-powered-by');
  let port = options.port;
  app.post('/{*path}', express.raw({ type: () => true, limit: '1mb' }), async (req, res) => {
    try {
      const body = Buffer.isBuffer(req.body) ? req.body.toString('utf8') : '';
      const now = options.now?.() ?? new Date();
      const eventId = header(req.headers[eventHeader.toLowerCase()])?.slice(0, 60) ?? null;
      const ts = header(req.headers[timestampHeader.toLowerCase()]);
      const sig = header(req.headers[signatureHeader.toLowerCase()]);
      const verdict: Verdict = verifySignature(
        await secretsFor(port, req.path),
        ts,
        sig,
        body,
        now.getTime(),
      );
      const [first] =
        eventId && verdict === 'verified'
          ? await db().query<{ id: number }>(
              "SELECT id FROM landing_receipts WHERE event_id = :eventId AND verdict = 'verified' ORDER BY id LIMIT 1",
              { replacements: { eventId }, type: QueryTypes.SELECT },
            )
          : [];
      await db().query(
        `INSERT INTO landing_receipts (path, event_id, timestamp_header, signature_header, verdict, repeat_of, body, received_at)
         VALUES (:path, :eventId, :ts, :sig, :verdict, :repeatOf, :body, :now)`,
        {
          replacements: {
            path: req.path.slice(0, 500),
            eventId,
            ts: ts?.slice(0, 40) ?? null,
            sig: sig?.slice(0, 200) ?? null,
            verdict,
            repeatOf: first ? Number(first.id) : null,
            body,
            now,
          },
        },
      );
      res.status(verdict === 'verified' ? 200 : 401).json({ received: true, verdict });
    } catch (err) {
      logger.error(
        { err: err instanceof Error ? err.message : String(err) },
        'the Landing could not store a delivery',
      );
      res.status(503).json({ received: false });
    }
  });
  const server: Server = app.listen(options.port, options.host ?? '127.0.0.1');
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });
  const address = server.address();
  port = typeof address === 'object' && address ? address.port : options.port;
  return {
    port,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}

type ReceiptRow = {
  id: number;
  path: string;
  event_id: string | null;
  verdict: Verdict;
  repeat_of: number | null;
  body: string;
  received_at: Date;
};

export async function listLandingReceipts(limit = 100): Promise<{ items: LandingReceipt[]; total: number }> {
  const rows = await db().query<ReceiptRow>(
    'SELECT id, path, event_id, verdict, repeat_of, body, received_at FROM landing_receipts ORDER BY id DESC LIMIT :limit',
    { replacements: { limit }, type: QueryTypes.SELECT },
  );
  const [count] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM landing_receipts', {
    type: QueryTypes.SELECT,
  });
  return {
    total: Number(count?.n ?? 0),
    items: rows.map((r) => {
      let headline: string | null = null;
      try {
        headline = (JSON.parse(r.body) as { alert?: { headline?: string } }).alert?.headline ?? null;
      } catch {
        headline = null;
      }
      return {
        id: Number(r.id),
        path: r.path,
        eventId: r.event_id,
        verdict: r.verdict,
        verdictText: verdictText[r.verdict] ?? r.verdict,
        repeatOf: r.repeat_of === null ? null : Number(r.repeat_of),
        headline,
        body: r.body.slice(0, 20_000),
        receivedAt: new Date(r.received_at).toISOString(),
      };
    }),
  };
}

/** The address of the Landing for a webhook registered against it (the demo registers one). */
export function landingUrl(port: number, name = 'alerts'): string {
  return `http://127.0.0.1:${port}/hooks/${name}`;
}
