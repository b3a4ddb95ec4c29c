/**
 * The workbench: a small single-page front end that talks to the service only through its HTTP
 * API. Pages by hash (#/vessels/3, #/fits/12), so reloading keeps the place and no server route
 * is needed for the pages themselves.
 */
import { api, ApiError, type User } from './api.js';
import { clear, h, notice } from './dom.js';
import { setDisplayUnits, UNIT_SYSTEM_WORDS, type UnitSystem } from './format.js';
import { auditPage } from './pages/audit.js';
import { comparePage } from './pages/compare.js';
import { fitPage } from './pages/fit.js';
import { fleetPage } from './pages/fleet.js';
import { newTestPage } from './pages/new-test.js';
import { liveOpenPage, livePage } from './pages/live.js';
import { planPage } from './pages/plan.js';
import { peoplePage } from './pages/people.js';
import { signInPage } from './pages/sign-in.js';
import { systemsPage } from './pages/systems.js';
import { vesselPage } from './pages/vessel.js';
import { canEditVessels, vesselEditPage } from './pages/vessel-edit.js';

export interface PageContext {
  user: User;
  params: string[];
  main: HTMLElement;
  go: (hash: string) => void;
}
type Page = (ctx: PageContext) => Promise<void>;

const routes: [RegExp, Page][] = [
  [/^#?\/?$/, fleetPage],
  [/^#\/vessels\/(\d+)$/, vesselPage],
  [/^#\/vessels\/new$/, vesselEditPage],
  [/^#\/vessels\/(\d+)\/edit$/, vesselEditPage],
  [/^#\/vessels\/(\d+)\/new-test$/, newTestPage],
  [/^#\/vessels\/(\d+)\/plan$/, planPage],
  [/^#\/vessels\/(\d+)\/outlets\/(\d+)\/compare$/, comparePage],
  [/^#\/vessels\/(\d+)\/live$/, liveOpenPage],
  [/^#\/live\/([0-9a-f-]{36})$/, livePage],
  [/^#\/fits\/(\d+)$/, fitPage],
  [/^#\/systems$/, systemsPage],
  [/^#\/audit$/, auditPage],
  [/^#\/people$/, peoplePage],
];

let user: User | null = null;
const main = document.getElementById('view') as HTMLElement;
const who = document.getElementById('who') as HTMLElement;

function go(hash: string): void {
  if (location.hash === hash) void show();
  else location.hash = hash;
}

function header(): void {
  clear(who);
  (document.querySelector('.bar nav') as HTMLElement).hidden = !user;
  if (!user) return;
  // the audit log is for auditors and admins; the others are not shown a link they cannot use
  const auditLink = document.querySelector('.bar nav a[href="#/audit"]') as HTMLElement | null;
  if (auditLink) auditLink.hidden = user.role !== 'auditor' && user.role !== 'admin';
  const newVesselLink = document.querySelector(
    '.bar nav a[href="#/vessels/new"]',
  ) as HTMLElement | null;
  if (newVesselLink) newVesselLink.hidden = !canEditVessels(user);
  const peopleLink = document.querySelector('.bar nav a[href="#/people"]') as HTMLElement | null;
  if (peopleLink) peopleLink.hidden = user.role !== 'admin' || user.sites !== null;
  const out = h('button', { type: 'button', class: 'quiet' }, 'Sign out');
  out.addEventListener('click', async () => {
    await api('DELETE', '/api/session').catch(() => undefined);
    user = null;
    header();
    void show();
  });
  who.append(
    h('span', { class: 'who-name' }, user.name),
    h('span', { class: `role role-${user.role}` }, user.role),
    unitsControl(user),
    out,
  );
}

/** The person's choice of units, kept with them on the service and used by every page and their PDFs. */
function unitsControl(u: User): HTMLElement {
  const select = h(
    'select',
    { id: 'display-units', 'aria-label': 'Units shown' },
    ...(['si', 'us'] as const).map((k) =>
      h('option', { value: k, selected: k === (u.displayUnits ?? 'si') }, UNIT_SYSTEM_WORDS[k]),
    ),
  ) as HTMLSelectElement;
  select.addEventListener('change', async () => {
    const chosen = select.value as UnitSystem;
    try {
      await api('PUT', '/api/session/preferences', { displayUnits: chosen });
      u.displayUnits = chosen;
      setDisplayUnits(chosen);
      void show();
    } catch (e) {
      select.value = u.displayUnits ?? 'si';
      main.prepend(notice('error', e instanceof Error ? e.message : String(e)));
    }
  });
  return h('label', { class: 'units-choice' }, 'Units ', select);
}

async function show(): Promise<void> {
  // each navigation draws into its own holder: a page (or sign-in form) still loading when the
  // person moves on keeps appending to its detached holder, never to the next page
  clear(main);
  const holder = h('div', { class: 'page' });
  main.append(holder);
  const current = () => holder.parentNode === main;
  main.setAttribute('aria-busy', 'true');
  try {
    if (!user) {
      try {
        user = (await api<{ user: User }>('GET', '/api/session')).user;
        setDisplayUnits(user.displayUnits);
      } catch (e) {
        if (!(e instanceof ApiError) || e.status !== 401) throw e;
      }
      if (!current()) return;
      header();
    }
    if (!user) {
      await signInPage(holder, (u) => {
        user = u;
        setDisplayUnits(u.displayUnits);
        header();
        void show();
      });
      return;
    }
    const hash = location.hash || '#/';
    for (const [re, page] of routes) {
      const m = re.exec(hash);
      if (m) {
        await page({ user, params: m.slice(1), main: holder, go });
        if (current()) focusHeading();
        return;
      }
    }
    holder.append(
      h('h1', { tabindex: -1 }, 'Page not found'),
      h('p', {}, h('a', { href: '#/' }, 'Back to the fleet')),
    );
  } catch (e) {
    if (!current()) return;
    if (e instanceof ApiError && e.status === 401) {
      user = null;
      header();
      return show();
    }
    holder.append(notice('error', e instanceof Error ? e.message : String(e)));
  } finally {
    if (current()) main.removeAttribute('aria-busy');
  }
}

/** After a page change, move focus to its heading so keyboard and screen-reader users start there. */
function focusHeading(): void {
  const h1 = main.querySelector('h1');
  if (h1) {
    h1.setAttribute('tabindex', '-1');
    h1.focus({ preventScroll: true });
  }
}

/** A data folder holding the invented demo says so on every page (GET /api/health → demo). */
async function demoBanner(): Promise<void> {
  try {
    const health = await api<{ demo?: boolean }>('GET', '/api/health');
    if (!health.demo) return;
    const banner = h(
      'div',
      { class: 'demo-banner', role: 'note' },
      'Demo data: every vessel, test and person here is invented (the fictional Kestrel Fen site). Do not use it for a real site.',
    );
    document.querySelector('header.bar')?.after(banner);
  } catch {
    // no banner when the health check cannot be read; the pages say what failed
  }
}

window.addEventListener('hashchange', () => void show());
void demoBanner();
void show();
