import type { Server } from 'node:http';
import { startScheduler } from '../jobs/index';
import type { Scheduler } from '../jobs/scheduler';
import { createApp } from './app';
import { loadConfig } from './config/env';
import { closeDatabase } from './db/sequelize';
import { logger, setLogLevel } from './lib/logger';
import { checksIdle, listenForEvidence } from './modules/alerts/alert-check.service';
import { startAlertMailer } from './modules/alerts/alert-mail.service';
import { watchImports } from './modules/imports/imports.service';
import { startLocalSmtpServer, type LocalSmtpServer } from './modules/mail/local-smtp';
import { createMailTransport, startMailWorker } from './modules/mail/mail.service';
import { startLanding, type Landing } from './modules/webhooks/landing';
import { ensureDemoWebhook, startWebhookWorker } from './modules/webhooks/webhooks.service';
import { ensureClientBuilt } from './runtime/client-build';
import { prepareDatabase } from './runtime/database';
import { limitHeapGrowth } from './runtime/heap';
import { demoAccounts, seedDemo } from './runtime/seed';

const say = (line: string): void => console.log(`[ballast] ${line}`);

async function main(): Promise<void> {
  const config = loadConfig();
  setLogLevel(config.logLevel);
  limitHeapGrowth(config.heapGrowthPercent);
  const { sequelize, embedded } = await prepareDatabase(config, say);
  const demo = config.demo ? await seedDemo(say, { reviews: true }) : false;
  const stopAlertChecks = listenForEvidence();
  const stopImportWatch = await watchImports(say);
  if (!process.argv.includes('--no-build')) ensureClientBuilt(config.rootDir, say);

  const app = createApp({ config, sequelize });
  const server: Server = app.listen(config.port, config.host);
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve);
    server.once('error', reject);
  });

  let scheduler: Scheduler | undefined;
  if (config.scheduler) {
    scheduler = await startScheduler({ log: (line) => say(line) });
    say(`Scheduler running with ${scheduler.scheduleCount} enabled schedule(s).`);
  }
  let localSmtp: LocalSmtpServer | undefined;
  if (!config.mail.smtp) {
    localSmtp = await startLocalSmtpServer({ port: config.mail.localPort });
    say(`Local SMTP server on 127.0.0.1:${localSmtp.port}; mail it receives is in the Outbox screen.`);
  } else say(`Mail goes out through ${config.mail.smtp.host}:${config.mail.smtp.port}.`);
  const mailWorker = startMailWorker({ transport: createMailTransport(config.mail, localSmtp?.port) });
  let landing: Landing | undefined;
  if (config.webhooks.landingPort > 0) {
    try {
      landing = await startLanding({ port: config.webhooks.landingPort });
      say(
        `The Landing (local webhook receiver) on 127.0.0.1:${landing.port}; it shows in Admin › The Landing.`,
      );
      if (config.demo && (await ensureDemoWebhook(landing.port)))
        say('Registered the demo webhook to the Landing.');
    } catch (err) {
      const why = err instanceof Error ? err.message : String(err);
      say(`The Landing could not listen (${why}); set BALLAST_LANDING_PORT to a free port, or 0 for none.`);
    }
  }
  const webhookWorker = startWebhookWorker();
  const alertMailer = startAlertMailer();

  let stopping = false;
  const stop = async (signal: string): Promise<void> => {
    if (stopping) return;
    stopping = true;
    say(`${signal} received; stopping...`);
    if (scheduler) {
      const { finished } = await scheduler.stop(30_000);
      say(
        finished
          ? 'Scheduler stopped.'
          : 'The running job did not finish in time; its transaction rolls back.',
      );
    }
    stopImportWatch();
    stopAlertChecks();
    await checksIdle();
    alertMailer.stop();
    await webhookWorker.stop();
    await landing?.close();
    await mailWorker.stop();
    await localSmtp?.close();
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
    });
    (app.locals.shutdown as () => void)();
    await closeDatabase();
    if (embedded) {
      await embedded.stop();
      say('MariaDB stopped cleanly.');
    }
    say('Stopped.');
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
  // Said only once every part has started and a signal stops them all: a service manager (and the stop
  // test) may send SIGINT the moment it reads this line.
  say(`Ballast is running at ${config.publicUrl}`);
  if (demo) {
    say('Demo sign-ins (password for each):');
    for (const account of demoAccounts)
      say(`  ${account.role.padEnd(8)} ${account.email.padEnd(34)} ${account.password}`);
  }
  say('Press Ctrl-C to stop.');
}

main().catch((err: unknown) => {
  logger.error({ err }, 'start failed');
  console.error(`[ballast] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
