import { pino } from 'pino';

/** One logger for the server and jobs; the level is set from config at boot. */
export const logger = pino({
  level: 'info',
  redact: ['req.headers.cookie', 'req.headers.authorization', 'password'],
});

export function setLogLevel(level: pino.LevelWithSilent): void {
  logger.level = level;
}
