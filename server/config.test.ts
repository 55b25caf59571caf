import { describe, expect, it } from 'vitest';
import { ConfigError, readConfig } from './config.js';

describe('readConfig', () => {
  it('defaults to 127.0.0.1:4300 and needs only DATABASE_URL', () => {
    const config = readConfig({ DATABASE_URL: 'postgres://u:p@127.0.0.1:5/db' });
    expect(config).toMatchObject({ port: 4300, host: '127.0.0.1', sessionSecret: null, secureCookie: false });
    expect(config.clientDir.endsWith('dist/proofline/browser')).toBe(true);
  });

  it('names every wrong setting at once', () => {
    expect(() => readConfig({ PORT: '70000', SESSION_SECRET: 'short' })).toThrow(ConfigError);
    try {
      readConfig({ PORT: '70000', SESSION_SECRET: 'short' });
    } catch (error) {
      const message = (error as Error).message;
      expect(message).toContain('PORT');
      expect(message).toContain('DATABASE_URL');
      expect(message).toContain('SESSION_SECRET');
    }
  });
});
