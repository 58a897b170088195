import { loadConfig, setting } from '../../server/config';

describe('configuration from the environment (server/config.ts)', () => {
  it('gives each setting its documented default when the variable is absent', () => {
    expect(setting('NOTICE_RETRY_SECONDS', {})).toBe(30);
    expect(setting('NOTICE_RETRY_LIMIT', {})).toBe(240);
    expect(setting('QUEUE_MAINTENANCE_SECONDS', {})).toBe(15);
    expect(setting('AWARD_SOLVER_THREADS', {})).toBe(2);
    expect(setting('LOG_LEVEL', {})).toBe('info');
  });

  it('reads a setting when it is used, so a value set later counts', () => {
    expect(setting('NOTICE_RETRY_SECONDS', { NOTICE_RETRY_SECONDS: '1' })).toBe(1);
  });

  it('refuses a malformed setting with an error naming the variable', () => {
    expect(() => setting('QUEUE_MAINTENANCE_SECONDS', { QUEUE_MAINTENANCE_SECONDS: 'soon' })).toThrow(/QUEUE_MAINTENANCE_SECONDS:/);
    expect(() => setting('LOG_LEVEL', { LOG_LEVEL: 'loud' })).toThrow(/LOG_LEVEL:/);
    expect(() => setting('AWARD_SOLVER_THREADS', { AWARD_SOLVER_THREADS: '1' })).toThrow(/AWARD_SOLVER_THREADS:/);
  });

  it('lists every bad variable of the server configuration in one error', () => {
    expect(() => loadConfig({ DATABASE_URL: 'not a url', PORT: 'eighty' })).toThrow(/DATABASE_URL[\s\S]*PORT|PORT[\s\S]*DATABASE_URL/);
  });
});
