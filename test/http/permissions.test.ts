/**
 * Every registered route against every role, and against site limits, from the app's own route
 * list. The tables below are declared separately from the routes: a new route with no row here
 * fails the first test, and a route whose roles or site scope differ from its row fails the second.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { SiteScope } from '../../server/http/access.js';
import { SYSTEM_ACTOR } from '../../server/store/index.js';
import type { Role } from '../../server/store/users.js';
import { GOOD_LOG, multipart, testApp, VESSEL_FILE, type TestApp } from './helpers.js';

type Rule = 'public' | Role[];
const ALL: Role[] = ['technician', 'engineer', 'auditor', 'admin'];
const TECH: Role[] = ['technician', 'engineer', 'admin'];
const ENG: Role[] = ['engineer', 'admin'];
const ENG_AUD: Role[] = ['engineer', 'auditor', 'admin'];
const AUD: Role[] = ['auditor', 'admin'];
const ADM: Role[] = ['admin'];

const TABLE: Record<string, Rule> = {
  'GET /api/health': 'public',
  'GET /api/openapi.json': 'public',
  'GET /api/docs*': 'public',
  'POST /api/session': 'public',
  'GET /api/session': ALL,
  'DELETE /api/session': ALL,
  'PUT /api/session/preferences': ALL,
  'GET /api/vessels': ALL,
  'POST /api/vessels': ENG,
  'GET /api/vessels/:id': ALL,
  'PUT /api/vessels/:id': ENG,
  'POST /api/vessels/:id/tests': TECH,
  'GET /api/vessels/:id/tests': ALL,
  'GET /api/vessels/:id/fits': ALL,
  'GET /api/vessels/:id/revisions': ALL,
  'GET /api/vessels/:id/revisions/:revision': ALL,
  'GET /api/fits/:id/vessel-revision': ALL,
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
  'GET /api/fits/:id/people': ALL,
  'GET /api/outlets/:id/trend': ALL,
  'GET /api/outlets/:id/compare': ALL,
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
  'GET /api/exports/:id': ENG_AUD,
  'GET /api/exports/:id/archive.zip': ENG_AUD,
  'POST /api/vessels/:id/inspect': TECH,
  'GET /api/tests/:id/series': ALL,
  'POST /api/systems/fit': TECH,
  'POST /api/systems/steady': ALL,
  'POST /api/systems/linearize': ALL,
  'POST /api/systems/fits': TECH,
  'GET /api/systems/fits': ALL,
  'GET /api/systems/fits/:id': ALL,
  'POST /api/systems/fits/:id/review': ENG,
  'GET /api/systems/fits/:id/report.pdf': ALL,
  'POST /api/vessels/:id/plan': ALL,
  'POST /api/vessels/:id/live': TECH,
  'GET /api/live/:id': ALL,
  'POST /api/live/:id/rows': TECH,
  'GET /api/live/:id/events': ALL,
  'POST /api/live/:id/close': TECH,
  'DELETE /api/live/:id': TECH,
  'GET /api/people': ADM,
  'POST /api/people': ADM,
  'PATCH /api/people/:id': ADM,
  'POST /api/people/:id/revoke': ADM,
  'POST /api/people/:id/tokens': ADM,
  'GET /api/tokens': ADM,
  'DELETE /api/tokens/:id': ADM,
  'GET /api/sites': ADM,
  'PUT /api/sites/:name/settings': ADM,
  'GET /api/sites/:name/clock': ALL,
  'PUT /api/sites/:name/clock': ENG,
  'PUT /api/outlets/:id/interval': ENG,
  'GET /api/due': ALL,
};

/**
 * Which site each route's record belongs to (server/http/access.ts, SiteScope). Routes with a
 * vessel, test, fit or outlet in the path are checked before the handler; 'listed' routes narrow
 * what they read; 'every-site' routes are closed to people limited to sites.
 */
const SCOPE: Record<string, SiteScope> = {
  'GET /api/health': 'none',
  'GET /api/openapi.json': 'none',
  'GET /api/docs*': 'none',
  'POST /api/session': 'none',
  'GET /api/session': 'none',
  'DELETE /api/session': 'none',
  'PUT /api/session/preferences': 'none',
  'GET /api/vessels': 'listed',
  'POST /api/vessels': 'listed',
  'GET /api/vessels/:id': 'vessel',
  'PUT /api/vessels/:id': 'vessel',
  'POST /api/vessels/:id/tests': 'vessel',
  'GET /api/vessels/:id/tests': 'vessel',
  'GET /api/vessels/:id/fits': 'vessel',
  'GET /api/vessels/:id/revisions': 'vessel',
  'GET /api/vessels/:id/revisions/:revision': 'vessel',
  'GET /api/fits/:id/vessel-revision': 'fit',
  'POST /api/vessels/:id/events': 'vessel',
  'GET /api/vessels/:id/events': 'vessel',
  'GET /api/tests/:id': 'test',
  'GET /api/tests/:id/fits': 'test',
  'GET /api/tests/:id/raw': 'test',
  'POST /api/tests/:id/retry': 'test',
  'POST /api/tests/:id/withdraw': 'test',
  'GET /api/fits/:id': 'fit',
  'POST /api/fits/:id/refit': 'fit',
  'POST /api/fits/:id/review': 'fit',
  'GET /api/fits/:id/people': 'fit',
  'GET /api/outlets/:id/trend': 'outlet',
  'GET /api/outlets/:id/compare': 'outlet',
  'GET /api/outlets/:id/history.csv': 'outlet',
  'GET /api/outlets/:id/status-changes': 'outlet',
  'PUT /api/outlets/:id/settings': 'outlet',
  'GET /api/fleet': 'listed',
  'GET /api/audit': 'listed',
  'GET /api/audit/verify': 'every-site',
  'GET /api/fits/:id/report.pdf': 'fit',
  'GET /api/fits/:id/report.json': 'fit',
  'GET /api/outlets/:id/report.pdf': 'outlet',
  'POST /api/exports': 'listed',
  'GET /api/exports/:id': 'listed', // only whoever started the job (or an admin) sees it; the start checked the site
  'GET /api/exports/:id/archive.zip': 'listed',
  'POST /api/vessels/:id/inspect': 'vessel',
  'GET /api/tests/:id/series': 'test',
  'POST /api/systems/fit': 'none',
  'POST /api/systems/steady': 'none',
  'POST /api/systems/linearize': 'none',
  'POST /api/systems/fits': 'listed',
  'GET /api/systems/fits': 'listed',
  'GET /api/systems/fits/:id': 'listed',
  'POST /api/systems/fits/:id/review': 'listed',
  'GET /api/systems/fits/:id/report.pdf': 'listed',
  'GET /api/people': 'every-site',
  'POST /api/people': 'every-site',
  'PATCH /api/people/:id': 'every-site',
  'POST /api/people/:id/revoke': 'every-site',
  'POST /api/people/:id/tokens': 'every-site',
  'GET /api/tokens': 'every-site',
  'DELETE /api/tokens/:id': 'every-site',
  'GET /api/sites': 'every-site',
  'PUT /api/sites/:name/settings': 'every-site',
  'GET /api/sites/:name/clock': 'listed',
  'PUT /api/sites/:name/clock': 'listed',
  'PUT /api/outlets/:id/interval': 'outlet',
  'GET /api/due': 'listed',
  'POST /api/vessels/:id/plan': 'vessel',
  'POST /api/vessels/:id/live': 'vessel',
  'GET /api/live/:id': 'listed',
  'POST /api/live/:id/rows': 'listed',
  'GET /api/live/:id/events': 'listed',
  'POST /api/live/:id/close': 'listed',
  'DELETE /api/live/:id': 'listed',
};

function keyOf(method: string, url: string): string {
  const m = method === 'HEAD' ? 'GET' : method;
  return url.startsWith('/api/docs') ? `${m} /api/docs*` : `${m} ${url}`;
}
const ruleFor = (method: string, url: string): Rule | undefined => TABLE[keyOf(method, url)];

interface Records {
  vessel: number;
  test: number;
  fit: number;
  outlet: number;
}

/** The problem type of an answer, if it is problem+json (docs pages answer HTML). */
function problemType(body: string): string | undefined {
  try {
    return (JSON.parse(body) as { type?: string }).type;
  } catch {
    return undefined;
  }
}

let t: TestApp;
let ids: Records & { person: number; token: number };
/** The same kinds of record at site "north", for the site walk. */
let north: Records;
/** One token per role for a person limited to site "main". */
const limited = {} as Record<Role, string>;

/** A route's path with its parameters filled in from the given records. */
function pathFor(url: string, r: Records, extra: { person: number; token: number }): string {
  const id = url.startsWith('/api/tests')
    ? r.test
    : url.startsWith('/api/fits')
      ? r.fit
      : url.startsWith('/api/outlets')
        ? r.outlet
        : url.startsWith('/api/people')
          ? extra.person
          : url.startsWith('/api/tokens')
            ? extra.token
            : r.vessel;
  return url
    .replace(':id', String(id))
    .replace(':name', 'main')
    .replace(':revision', '1')
    .replace('*', 'index.css');
}

beforeAll(async () => {
  t = await testApp();
  const v = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('admin'),
    payload: VESSEL_FILE,
  });
  const m = multipart([{ field: 'log', name: 'log.csv', bytes: GOOD_LOG }]);
  const up = await t.app.inject({
    method: 'POST',
    url: `/api/vessels/${v.json().id}/tests`,
    headers: { ...t.auth('admin'), ...m.headers },
    payload: m.payload,
  });
  // a throwaway person and token for the people routes (revoking them must not lock the walk out)
  const spare = await t.store.users.createToken(SYSTEM_ACTOR, 'spare (fictional)', 'technician');
  ids = {
    vessel: v.json().id,
    test: up.json().test.id,
    fit: up.json().fit.id,
    outlet: v.json().outlets[0].id,
    person: spare.user.id,
    token: spare.tokenId,
  };
  const nv = await t.app.inject({
    method: 'POST',
    url: '/api/vessels',
    headers: t.auth('admin'),
    payload: { ...VESSEL_FILE, name: 'N-1', site: 'north' },
  });
  const nm = multipart([{ field: 'log', name: 'log.csv', bytes: GOOD_LOG }]);
  const nup = await t.app.inject({
    method: 'POST',
    url: `/api/vessels/${nv.json().id}/tests`,
    headers: { ...t.auth('admin'), ...nm.headers },
    payload: nm.payload,
  });
  north = {
    vessel: nv.json().id,
    test: nup.json().test.id,
    fit: nup.json().fit.id,
    outlet: nv.json().outlets[0].id,
  };
  for (const role of ALL) {
    const p = await t.store.users.addPerson(SYSTEM_ACTOR, `${role} at main (fictional)`, role, [
      'main',
    ]);
    limited[role] = (await t.store.users.createTokenFor(SYSTEM_ACTOR, p.id)).token;
  }
});

describe('permission table', () => {
  it('has a rule for every registered route, and no rule without a route', () => {
    const missing = t.app.routeList
      .filter((r) => ruleFor(r.method, r.url) === undefined)
      .map((r) => `${r.method} ${r.url}`);
    expect(missing).toEqual([]);
    for (const key of Object.keys(TABLE)) {
      const [method, url] = key.split(' ');
      const found = t.app.routeList.some(
        (r) =>
          r.method === method &&
          (url.endsWith('*') ? r.url.startsWith(url.slice(0, -1)) : r.url === url),
      );
      expect(found, key).toBe(true);
    }
  });

  it('each route declares exactly the roles of its row', () => {
    for (const r of t.app.routeList) {
      const rule = ruleFor(r.method, r.url)!;
      expect(r.roles === 'public' ? 'public' : [...r.roles].sort(), `${r.method} ${r.url}`).toEqual(
        rule === 'public' ? 'public' : [...rule].sort(),
      );
    }
  });

  it('answers every route for every role (and no credentials) as the table says', async () => {
    const checked: string[] = [];
    for (const r of t.app.routeList) {
      const rule = ruleFor(r.method, r.url)!;
      const url = pathFor(r.url, ids, ids);
      for (const who of [null, ...ALL] as (Role | null)[]) {
        const res = await t.app.inject({
          method: r.method as 'GET',
          url,
          headers: who ? t.auth(who) : {},
        });
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
  }, 180_000); // every route for 5 callers (hundreds of requests; on PostgreSQL each a few round trips)

  it('each route declares exactly the site scope of its row', () => {
    const missing = t.app.routeList
      .filter((r) => SCOPE[keyOf(r.method, r.url)] === undefined)
      .map((r) => `${r.method} ${r.url}`);
    expect(missing).toEqual([]);
    for (const r of t.app.routeList)
      expect(r.scope, `${r.method} ${r.url}`).toBe(SCOPE[keyOf(r.method, r.url)]);
  });

  it('walks every route against site limits: a person limited to "main" is refused "north" records and routes for everyone', async () => {
    const as = (role: Role) => ({ authorization: `Bearer ${limited[role]}` });
    let walked = 0;
    for (const r of t.app.routeList) {
      const rule = ruleFor(r.method, r.url)!;
      const scope = SCOPE[keyOf(r.method, r.url)];
      for (const role of ALL) {
        if (rule !== 'public' && !rule.includes(role)) continue; // the role walk covers these
        const label = `${r.method} ${r.url} as ${role} limited to main`;
        const other = await t.app.inject({
          method: r.method as 'GET',
          url: pathFor(r.url, north, ids),
          headers: as(role),
        });
        if (
          scope === 'vessel' ||
          scope === 'test' ||
          scope === 'fit' ||
          scope === 'outlet' ||
          scope === 'every-site'
        ) {
          expect(other.statusCode, label).toBe(403);
          if (r.method !== 'HEAD')
            expect(problemType(other.body), label).toBe('urn:efflux:problem:site-forbidden'); // HEAD has no body
        } else if (scope === 'none') {
          expect(problemType(other.body), label).not.toBe('urn:efflux:problem:site-forbidden');
        } // 'listed': the next test checks what each one shows and takes
        if (scope !== 'every-site' && scope !== 'listed') {
          const own = await t.app.inject({
            method: r.method as 'GET',
            url: pathFor(r.url, ids, ids),
            headers: as(role),
          });
          expect([401, 403], `${label}, own site → ${own.statusCode}`).not.toContain(
            own.statusCode,
          );
        }
        walked++;
      }
    }
    expect(walked).toBeGreaterThan(t.app.routeList.length);
  });

  it("'listed' routes show and take only the person's sites", async () => {
    const as = { authorization: `Bearer ${limited.admin}` };
    const vessels = await t.app.inject({ method: 'GET', url: '/api/vessels', headers: as });
    expect(vessels.json().items.map((v: { site: string }) => v.site)).toEqual(['main']);
    expect(vessels.json().total).toBe(1);
    const fleet = await t.app.inject({ method: 'GET', url: '/api/fleet', headers: as });
    expect(new Set(fleet.json().items.map((i: { site: string }) => i.site))).toEqual(
      new Set(['main']),
    );
    expect(
      (await t.app.inject({ method: 'GET', url: '/api/fleet?site=north', headers: as })).statusCode,
    ).toBe(403);
    expect((await t.app.inject({ method: 'GET', url: '/api/audit', headers: as })).statusCode).toBe(
      403,
    );
    expect(
      (
        await t.app.inject({
          method: 'GET',
          url: `/api/audit?vesselId=${north.vessel}`,
          headers: as,
        })
      ).statusCode,
    ).toBe(403);
    expect(
      (await t.app.inject({ method: 'GET', url: `/api/audit?vesselId=${ids.vessel}`, headers: as }))
        .statusCode,
    ).toBe(200);
    expect(
      (
        await t.app.inject({
          method: 'POST',
          url: '/api/exports',
          headers: as,
          payload: { site: 'north' },
        })
      ).statusCode,
    ).toBe(403);
    expect(
      (await t.app.inject({ method: 'POST', url: '/api/exports', headers: as, payload: {} }))
        .statusCode,
    ).toBe(403);
    expect(
      (
        await t.app.inject({
          method: 'POST',
          url: '/api/vessels',
          headers: as,
          payload: { ...VESSEL_FILE, name: 'N-2', site: 'north' },
        })
      ).statusCode,
    ).toBe(403);
    // nor may a vessel of theirs be moved to another site
    const moved = await t.app.inject({
      method: 'PUT',
      url: `/api/vessels/${ids.vessel}`,
      headers: as,
      payload: { ...VESSEL_FILE, site: 'north' },
    });
    expect(moved.statusCode).toBe(403);
    // a live test belongs to its vessel's site: reading, feeding, closing or abandoning one at "north" is refused
    const liveNorth = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${north.vessel}/live`,
      headers: t.auth('admin'),
      payload: { fileName: 'n.csv' },
    });
    const liveMain = await t.app.inject({
      method: 'POST',
      url: `/api/vessels/${ids.vessel}/live`,
      headers: t.auth('admin'),
      payload: { fileName: 'm.csv' },
    });
    for (const [method, suffix] of [
      ['GET', ''],
      ['GET', '/events'],
      ['POST', '/rows?offset=0'],
      ['POST', '/close'],
      ['DELETE', ''],
    ] as const) {
      const res = await t.app.inject({
        method,
        url: `/api/live/${liveNorth.json().id}${suffix}`,
        headers: { ...as, 'content-type': 'application/octet-stream' },
        payload: method === 'POST' ? 'x' : undefined,
      });
      expect(res.statusCode, `${method} live${suffix}`).toBe(403);
      expect(problemType(res.body)).toBe('urn:efflux:problem:site-forbidden');
    }
    expect(
      (await t.app.inject({ method: 'GET', url: `/api/live/${liveMain.json().id}`, headers: as }))
        .statusCode,
    ).toBe(200);
    for (const l of [liveNorth, liveMain])
      await t.app.inject({
        method: 'DELETE',
        url: `/api/live/${l.json().id}`,
        headers: t.auth('admin'),
      });
    // the unlimited admin sees both
    expect(
      (await t.app.inject({ method: 'GET', url: '/api/vessels', headers: t.auth('admin') })).json()
        .total,
    ).toBe(2);
  });

  it("joint fits are listed, read, reviewed and reported only within the person's sites", async () => {
    // a minimal record of the one result shape: this test is about sites, not numbers
    const result = {
      format: 'efflux-system-fit' as const,
      version: 2,
      engineVersion: 'test',
      converged: true,
      parameters: [],
      correlations: { parameters: [], matrix: [] },
      solver: { method: 'none', stopReason: 'none', converged: true, iterations: 0 },
      warnings: [],
      outlets: {},
      residuals: [],
      covariance: [],
      theta: [],
      free: [],
      degreesOfFreedom: 1,
      coverageFactor: 2,
      system: { name: 'S (fictional)', vessels: [] },
    };
    const make = (site: string) =>
      t.store.jointFits.create(SYSTEM_ACTOR, {
        site,
        systemName: 'S (fictional)',
        settings: {},
        result,
        drawing: [],
        notes: null,
        files: [{ role: 'system', vessel: '', fileName: 's.json', bytes: Buffer.from('{}') }],
      });
    const atNorth = await make('north');
    const atMain = await make('main');
    const as = { authorization: `Bearer ${limited.admin}` };
    const list = await t.app.inject({ method: 'GET', url: '/api/systems/fits', headers: as });
    expect(list.json().items.map((i: { id: number }) => i.id)).toEqual([atMain.id]);
    for (const [method, suffix, payload] of [
      ['GET', '', undefined],
      ['GET', '/report.pdf', undefined],
      ['POST', '/review', { decision: 'approve' }],
    ] as const) {
      const res = await t.app.inject({
        method,
        url: `/api/systems/fits/${atNorth.id}${suffix}`,
        headers: as,
        payload,
      });
      expect(res.statusCode, `${method} ${suffix}`).toBe(403);
      expect(problemType(res.body)).toBe('urn:efflux:problem:site-forbidden');
    }
    const own = await t.app.inject({
      method: 'GET',
      url: `/api/systems/fits/${atMain.id}`,
      headers: as,
    });
    expect(own.statusCode).toBe(200);
    // storing one for a site outside the person's limits is refused before any fitting
    const m = multipart(
      [
        {
          field: 'system',
          name: 's.json',
          bytes: Buffer.from(
            JSON.stringify({
              name: 'S (fictional)',
              site: 'north',
              vessels: [
                {
                  id: 'A',
                  name: 'A',
                  shape: { kind: 'vertical-cylinder', diameterM: 1 },
                  outlet: { boreM: 0.03, elevationM: 0 },
                  dischargesTo: null,
                  connection: 'free',
                },
              ],
            }),
          ),
        },
      ],
      {},
    );
    const store = await t.app.inject({
      method: 'POST',
      url: '/api/systems/fits',
      headers: { ...as, ...m.headers },
      payload: m.payload,
    });
    expect(store.statusCode, store.body).toBe(403);
    expect(problemType(store.body)).toBe('urn:efflux:problem:site-forbidden');
  });

  it('a bad token is 401, not 403', async () => {
    const res = await t.app.inject({
      method: 'GET',
      url: '/api/vessels',
      headers: { authorization: 'Bearer nope' },
    });
    expect(res.statusCode).toBe(401);
    expect(res.headers['www-authenticate']).toBe('Bearer');
  });
});
