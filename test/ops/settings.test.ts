/** The settings schema: defaults, refusals naming the variable, trustProxy's forms, and .env.example kept in step. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { envExample, serveConfig, SettingsError, SETTINGS } from '../../server/cli/serve-config.js';
import { efflux, root } from '../cli/run-cli.js';
import { testApp } from '../http/helpers.js';

describe('settings from the environment', () => {
  it('defaults: loopback, 8080, no demo, ./data, 40 MiB uploads, cookie not Secure, no proxy trusted', () => {
    const c = serveConfig({});
    expect(c).toMatchObject({
      host: '127.0.0.1',
      port: 8080,
      demo: false,
      uploadLimitBytes: 40 * 1024 * 1024,
      secureCookie: false,
      trustProxy: false,
      signInPerMinute: 10,
      log: 'info',
      webhooks: [],
    });
    expect(c.dataDir).toBe(join(process.cwd(), 'data'));
    expect(serveConfig({}, { demo: true }).dataDir).toBe(join(process.cwd(), 'data-demo'));
    expect(
      serveConfig({ EFFLUX_DATA_DIR: '/srv/x' }, { demo: true, dataDir: '/srv/y' }).dataDir,
    ).toBe('/srv/y');
  });

  it.each([
    ['PORT', 'eighty', /setting PORT: must be a whole number/],
    ['PORT', '70000', /setting PORT: .*65535/],
    ['EFFLUX_UPLOAD_LIMIT_MB', '-3', /setting EFFLUX_UPLOAD_LIMIT_MB/],
    ['EFFLUX_SECURE_COOKIE', 'yes', /setting EFFLUX_SECURE_COOKIE: must be 0, 1, true or false/],
    ['EFFLUX_LOG', 'loud', /setting EFFLUX_LOG: must be silent/],
    [
      'EFFLUX_TRUST_PROXY',
      '10.0.0.1/40',
      /setting EFFLUX_TRUST_PROXY: "10.0.0.1\/40" is not an IP address or CIDR range/,
    ],
    ['EFFLUX_WEBHOOKS', 'ftp://x', /setting EFFLUX_WEBHOOKS: .*not an http\(s\) URL/],
  ])('%s=%s is refused naming the variable', (key, value, message) => {
    expect(() => serveConfig({ [key]: value })).toThrow(SettingsError);
    expect(() => serveConfig({ [key]: value })).toThrow(message);
  });

  it('EFFLUX_DATABASE_URL: a postgres:// address, refused otherwise without repeating its password', () => {
    expect(serveConfig({}).databaseUrl).toBeUndefined();
    expect(
      serveConfig({ EFFLUX_DATABASE_URL: 'postgres://efx:pw@db:5432/efflux' }).databaseUrl,
    ).toBe('postgres://efx:pw@db:5432/efflux');
    const bad = () => serveConfig({ EFFLUX_DATABASE_URL: 'mysql://efx:hunter2@db/efflux' });
    expect(bad).toThrow(SettingsError);
    expect(bad).toThrow('setting EFFLUX_DATABASE_URL: must be a postgres://');
    expect(bad).toThrow('"mysql://efx:***@db/efflux"');
    expect(bad).not.toThrow(/hunter2/);
  });

  it('trustProxy: false, true, a hop count, or proxy addresses', () => {
    expect(serveConfig({ EFFLUX_TRUST_PROXY: 'true' }).trustProxy).toBe(true);
    expect(serveConfig({ EFFLUX_TRUST_PROXY: '2' }).trustProxy).toBe(2);
    expect(serveConfig({ EFFLUX_TRUST_PROXY: '127.0.0.1, 10.0.0.0/8,::1' }).trustProxy).toEqual([
      '127.0.0.1',
      '10.0.0.0/8',
      '::1',
    ]);
    expect(serveConfig({ EFFLUX_SECURE_COOKIE: '1' }).secureCookie).toBe(true);
  });

  it('.env.example lists every setting with its default, as the schema says', () => {
    const text = readFileSync(join(root, '.env.example'), 'utf8');
    expect(text).toBe(envExample());
    for (const [k, s] of Object.entries(SETTINGS)) expect(text).toContain(`\n${k}=${s.dflt}\n`);
  });

  it('a bad setting stops `efflux serve` with exit 2 and one line naming the variable', () => {
    const r = efflux(['serve'], {
      env: { PORT: 'abc', EFFLUX_DATA_DIR: '/nonexistent/never-created' },
    });
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(
      'efflux: setting PORT: must be a whole number (0–65535), not "abc"',
    );
  });
});

describe('behind a reverse proxy', () => {
  const attempts = async (app: import('fastify').FastifyInstance, client: string, n: number) => {
    const codes: number[] = [];
    for (let i = 0; i < n; i++) {
      const r = await app.inject({
        method: 'POST',
        url: '/api/session',
        remoteAddress: '127.0.0.1',
        headers: { 'x-forwarded-for': client },
        payload: { token: 'x' },
      });
      codes.push(r.statusCode);
    }
    return codes;
  };

  it("with trustProxy the sign-in limit is per client (X-Forwarded-For); without it every client shares the proxy's", async () => {
    const trusted = await testApp({ signInPerMinute: 2, trustProxy: ['127.0.0.1'] });
    expect(await attempts(trusted.app, '198.51.100.7', 3)).toEqual([401, 401, 429]);
    expect(await attempts(trusted.app, '198.51.100.8', 1)).toEqual([401]); // another client: its own count
    await trusted.app.close();
    const plain = await testApp({ signInPerMinute: 2 });
    expect(await attempts(plain.app, '198.51.100.7', 2)).toEqual([401, 401]);
    expect(await attempts(plain.app, '198.51.100.8', 1)).toEqual([429]); // all are the proxy
    await plain.app.close();
  });

  it('EFFLUX_SECURE_COOKIE=1 marks the session cookie Secure', async () => {
    const t = await testApp({
      secureCookie: serveConfig({ EFFLUX_SECURE_COOKIE: '1' }).secureCookie,
    });
    const r = await t.app.inject({
      method: 'POST',
      url: '/api/session',
      payload: { token: t.tokens.technician },
    });
    expect(r.statusCode).toBeLessThan(300);
    expect(String(r.headers['set-cookie'])).toMatch(/;\s*Secure/i);
    await t.app.close();
  });
});
