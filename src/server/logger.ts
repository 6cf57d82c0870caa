import 'server-only';
import pino from 'pino';

/**
 * One pino logger for the app and the worker. JSON lines in production (for whatever collects
 * logs), readable lines in development. Anything that can carry a credential is redacted.
 */
export const redactPaths = [
  'password',
  '*.password',
  'token',
  '*.token',
  'secret',
  '*.secret',
  'authorization',
  '*.authorization',
  'cookie',
  '*.cookie',
  '*.headers.authorization',
  '*.headers.cookie',
  '*.headers["set-cookie"]',
  'headers.authorization',
  'headers.cookie',
  'DATABASE_URL',
  'S3_SECRET_ACCESS_KEY',
  'AUTH_SECRET',
];

interface LoggerOptions {
  level?: string;
  /** Write JSON to this stream instead of stdout (tests read it back). */
  destination?: pino.DestinationStream;
  pretty?: boolean;
}

export function createLogger(options: LoggerOptions = {}): pino.Logger {
  const level = options.level ?? process.env.LOG_LEVEL ?? 'info';
  const pretty = options.pretty ?? (process.env.NODE_ENV !== 'production' && process.env.LOG_FORMAT !== 'json');
  const base: pino.LoggerOptions = {
    level,
    base: { service: process.env.VARIGATE_PROCESS ?? 'web' },
    redact: { paths: redactPaths, censor: '[redacted]' },
  };
  if (options.destination) return pino(base, options.destination);
  if (pretty) {
    return pino({
      ...base,
      transport: { target: 'pino-pretty', options: { colorize: true, translateTime: 'SYS:HH:MM:ss' } },
    });
  }
  return pino(base);
}

export const logger = createLogger();
