/**
 * Every registered route against every role, from the app's own route list. The table below is
 * declared separately from the routes: a new route with no row here fails the first test, and a
 * route whose roles differ from its row fails the second.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../server/store/users.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from './helpers.js';

type Rule = 'public' | Role[];
const ALL: Role[] = ['technician', 'engineer', 'auditor', 'admin'];
const TECH: Role[] = ['technician', 'engineer', 'admin'];
const ENG: Role[] = ['engineer', 'admin'];
const ENG_AUD: Role[] = ['engineer', 'auditor', 'admin'];
const AUD: Role[] = ['auditor', 'admin'];

const TABLE: Record<string, Rule> = {
  'GET /api/health': 'public',
  'GET /api/openapi.json': 'public',
  'GET /api/docs*': 'public',
  'POST /api/session': 'public',
  'GET /api/session': ALL,
  'DELETE /api/session': ALL,
  'GET /api/vessels': ALL,
  'POST /api/vessels': ENG,
  'GET /api/vessels/:id': ALL,
  'PUT /api/vessels/:id': ENG,
  'POST /api/vessels/:id/tests': TECH,
  'GET /api/vessels/:id/tests': ALL,
  'GET /api/vessels/:id/fits': ALL,
  'POST /api/vessels/:id/events': ENG,
  'GET /api/vessels/:id/events': ENG_AUD,
  'GET /api/tests/:id': ALL,
  'GET /api/tests/:id/fits': ALL,
  'GET /api/tests/:id/raw': ALL,
  'POST /api/tests/:id/retry': TECH,
  'POST /api/tests/:id/withdraw': ENG,
  'GET /api/fits/:id': ALL,
  'POST /api/fits/:id/refit': TECH,
  'POST /api/fits/:id/review': ENG,
  'GET /api/outlets/:id/trend': ALL,
  'GET /api/outlets/:id/history.csv': ALL,
  'GET /api/outlets/:id/status-changes': ALL,
  'PUT /api/outlets/:id/settings': ENG,
  'GET /api/fleet': ALL,
  'GET /api/audit': AUD,
  'GET /api/audit/verify': AUD,
  'GET /api/fits/:id/report.pdf': ALL,
  'GET /api/fits/:id/report.json': ALL,
  'GET /api/outlets/:id/report.pdf': ALL,
  'POST /api/exports': ENG_AUD,
  'POST /api/vessels/:id/inspect': TECH,
  'GET /api/tests/:id/series': ALL,
  'POST /api/systems/fit': TECH,
  'POST /api/systems/steady': ALL,
  'POST /api/systems/linearize': ALL,
};

function ruleFor(method: string, url: string): Rule | undefined {
  const m = method === 'HEAD' ? 'GET' : method;
  if (url.startsWith('/api/docs')) return TABLE[`${m} /api/docs*`];
  return TABLE[`${m} ${url}`];
}

let t: TestApp;
let ids: { vessel: number; test: number; fit: number };

beforeAll(async () => {
  t = await testApp();
  const v = await t.app.inject({ method: 'POST', url: '/api/vessels', headers: t.auth('admin'), payload: VESSEL_FILE });
  const m = multipart([{ field: 'log', name: 'log.csv', bytes: GOOD_LOG }]);
  const up = await t.app.inject({ method: 'POST', url: `/api/vessels/${v.json().id}/tests`, headers: { ...t.auth('admin'), ...m.headers }, payload: m.payload });
  ids = { vessel: v.json().id, test: up.json().test.id, fit: up.json().fit.id };
});

describe('permission table', () => {
  it('has a rule for every registered route, and no rule without a route', () => {
    const missing = t.app.routeList.filter((r) => ruleFor(r.method, r.url) === undefined).map((r) => `${r.method} ${r.url}`);
    expect(missing).toEqual([]);
    for (const key of Object.keys(TABLE)) {
      const [method, url] = key.split(' ');
      const found = t.app.routeList.some((r) => r.method === method && (url.endsWith('*') ? r.url.startsWith(url.slice(0, -1)) : r.url === url));
      expect(found, key).toBe(true);
    }
  });

  it('each route declares exactly the roles of its row', () => {
    for (const r of t.app.routeList) {
      const rule = ruleFor(r.method, r.url)!;
      expect(r.roles === 'public' ? 'public' : [...r.roles].sort(), `${r.method} ${r.url}`).toEqual(rule === 'public' ? 'public' : [...rule].sort());
    }
  });

  it('answers every route for every role (and no credentials) as the table says', async () => {
    const checked: string[] = [];
    for (const r of t.app.routeList) {
      const rule = ruleFor(r.method, r.url)!;
      const url = r.url
        .replace(':id', String(r.url.startsWith('/api/tests') ? ids.test : r.url.startsWith('/api/fits') ? ids.fit : ids.vessel))
        .replace('*', 'index.css');
      for (const who of [null, ...ALL] as (Role | null)[]) {
        const res = await t.app.inject({ method: r.method as 'GET', url, headers: who ? t.auth(who) : {} });
        const label = `${r.method} ${r.url} as ${who ?? 'nobody'} → ${res.statusCode}`;
        if (rule === 'public' || (who !== null && rule.includes(who))) {
          expect([401, 403], label).not.toContain(res.statusCode);
        } else {
          expect(res.statusCode, label).toBe(who === null ? 401 : 403);
          expect(res.headers['content-type'], label).toMatch(/^application\/problem\+json/);
        }
        checked.push(label);
      }
    }
    expect(checked.length).toBe(t.app.routeList.length * 5);
  });

  it('a bad token is 401, not 403', async () => {
    const res = await t.app.inject({ method: 'GET', url: '/api/vessels', headers: { authorization: 'Bearer nope' } });
    expect(res.statusCode).toBe(401);
    expect(res.headers['www-authenticate']).toBe('Bearer');
  });
});
