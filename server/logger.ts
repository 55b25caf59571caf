import type { Logger } from './db/client.js';

/** Plain stderr logging with a timestamp; enough for a single-process server. */
export const consoleLogger: Logger = {
  info: (message) => console.log(message),
  warn: (message) => console.warn(`${new Date().toISOString()} warn  ${message}`),
  error: (message, error) => console.error(`${new Date().toISOString()} error ${message}`, error ?? ''),
};
