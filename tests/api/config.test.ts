/**
 * Config is a schema validated at boot; a bad or missing setting stops the server with a
 * message naming it (common practice, "twelve-factor" config from the environment).
 */
import { ConfigError, loadConfig, loadDatabaseUrl } from '../../server/config';

const good = {
  DATABASE_URL: 'postgres://trueround@127.0.0.1:54330/trueround_test',
  JWT_SECRET: 'x'.repeat(32),
};

test('defaults: 127.0.0.1:8080, 900 s access, 30 d refresh, 20 sign-ins per 15 min', () => {
  const c = loadConfig(good);
  expect(c).toMatchObject({
    NODE_ENV: 'development',
    HOST: '127.0.0.1',
    PORT: 8080,
    ACCESS_TOKEN_TTL_S: 900,
    REFRESH_TOKEN_TTL_S: 30 * 24 * 3600,
    SIGN_IN_RATE_LIMIT: 20,
    LOG_LEVEL: 'info',
    TRUST_PROXY: false,
    CORS_ORIGINS: [],
  });
  expect(c.WEB_DIST).toBeUndefined();
});

test('settings are read and converted; PORT 0 (any free port) is allowed', () => {
  const c = loadConfig({
    ...good,
    NODE_ENV: 'production',
    PORT: '0',
    ACCESS_TOKEN_TTL_S: '60',
    SIGN_IN_RATE_LIMIT: '3',
    WEB_DIST: '/srv/web',
    TRUST_PROXY: '1',
    CORS_ORIGINS: 'http://localhost:8081, http://127.0.0.1:8081',
  });
  expect(c.PORT).toBe(0);
  expect(c.ACCESS_TOKEN_TTL_S).toBe(60);
  expect(c.SIGN_IN_RATE_LIMIT).toBe(3);
  expect(c.WEB_DIST).toBe('/srv/web');
  expect(c.TRUST_PROXY).toBe(1);
  expect(c.CORS_ORIGINS).toEqual(['http://localhost:8081', 'http://127.0.0.1:8081']);
});

test('NODE_ENV=test logs nothing unless LOG_LEVEL says otherwise', () => {
  expect(loadConfig({ ...good, NODE_ENV: 'test' }).LOG_LEVEL).toBe('silent');
  expect(loadConfig({ ...good, NODE_ENV: 'test', LOG_LEVEL: 'debug' }).LOG_LEVEL).toBe('debug');
});

test('a short JWT_SECRET is refused with a message naming it', () => {
  expect(() => loadConfig({ ...good, JWT_SECRET: 'too-short' })).toThrow(
    new ConfigError('Config: JWT_SECRET must be at least 32 characters'),
  );
});

test('a missing DATABASE_URL is refused with a message naming it (an empty one counts as missing)', () => {
  expect(() => loadConfig({ JWT_SECRET: good.JWT_SECRET })).toThrow('Config: DATABASE_URL is required');
  expect(() => loadConfig({ ...good, DATABASE_URL: '' })).toThrow('Config: DATABASE_URL is required');
  expect(() => loadDatabaseUrl({})).toThrow('Config: DATABASE_URL is required');
  expect(() => loadConfig({ ...good, DATABASE_URL: 'mysql://x' })).toThrow(
    'Config: DATABASE_URL must be a postgres:// URL',
  );
});

test('every bad setting is named at once, with its value and limit', () => {
  let message = '';
  try {
    loadConfig({ DATABASE_URL: good.DATABASE_URL, PORT: '70000', NODE_ENV: 'staging', SIGN_IN_RATE_LIMIT: 'lots' });
  } catch (e) {
    message = (e as Error).message;
  }
  expect(message).toMatch(/^Config: /);
  expect(message).toContain('PORT must be between 0 and 65535, got 70000');
  expect(message).toContain('NODE_ENV must be one of development, production, test');
  expect(message).toContain('JWT_SECRET is required');
  expect(message).toContain('SIGN_IN_RATE_LIMIT must be an integer, got "lots"');
});

test('CORS_ORIGINS and TRUST_PROXY refuse what they cannot mean', () => {
  expect(() => loadConfig({ ...good, CORS_ORIGINS: 'localhost:8081' })).toThrow(
    /CORS_ORIGINS must be a comma-separated list of origins/,
  );
  expect(() => loadConfig({ ...good, CORS_ORIGINS: 'http://localhost:8081/path' })).toThrow(/CORS_ORIGINS/);
  expect(() => loadConfig({ ...good, TRUST_PROXY: 'yes' })).toThrow(/TRUST_PROXY must be true, false or a hop count/);
});
