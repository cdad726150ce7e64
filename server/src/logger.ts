import pino, { type Logger } from 'pino';
import type { Config } from './config';

/**
 * The server's structured logger. Cookies, CSRF tokens and passwords never reach the log.
 */
export function createLogger(level: Config['logLevel']): Logger {
  return pino({
    level,
    base: { service: 'evalon-server' },
    redact: {
      paths: [
        'req.headers.cookie',
        'req.headers.authorization',
        'req.headers["x-xsrf-token"]',
        'res.headers["set-cookie"]',
        '*.password',
        '*.currentPassword',
        '*.newPassword',
        '*.token',
      ],
      censor: '[redacted]',
    },
  });
}

export type { Logger };
