import { SMTPServer } from 'smtp-server';
import { logger } from '../../lib/logger';
import { storeReceived } from './outbox.service';

export type LocalSmtpServer = { port: number; close: () => Promise<void> };

/**
 * Ballast's own SMTP server for development and demos: listens on loopback only, accepts every message
 * without authentication and keeps it in outbox_messages for the Outbox screen. STARTTLS is off because
 * smtp-server's built-in certificate has expired and there is nothing to protect on loopback.
 */
export async function startLocalSmtpServer(options: {
  port: number;
  host?: string;
}): Promise<LocalSmtpServer> {
  const server = new SMTPServer({
    name: 'ballast.local',
    banner: 'Ballast local SMTP server',
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    logger: false,
    size: 40 * 1024 * 1024,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          callback(
            Object.assign(new Error('Message too large for the local SMTP server'), { responseCode: 552 }),
          );
          return;
        }
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
        const to = session.envelope.rcptTo.map((r) => r.address);
        storeReceived(Buffer.concat(chunks), { from, to }).then(
          () => callback(),
          (err: unknown) => {
            logger.error(
              { err: err instanceof Error ? err.message : String(err) },
              'local SMTP server could not store a message',
            );
            callback(Object.assign(new Error('Temporary local failure'), { responseCode: 451 }));
          },
        );
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(options.port, options.host ?? '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (err) => logger.warn({ err: err.message }, 'local SMTP server error'));
  const address = server.server.address();
  const port = typeof address === 'object' && address ? address.port : options.port;
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
