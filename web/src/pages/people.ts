/**
 * People and sites, for admins with no site limit: everyone with their role, site limits and
 * tokens; add a person, change role or sites, revoke (every token and open session ends at once);
 * make a token (shown once) or revoke one; allow self-review on a site with one qualified person.
 */
import { api, ApiError, type Role } from '../api.js';
import { clear, field, h, notice, select, table } from '../dom.js';
import { dateTime } from '../format.js';
import type { PageContext } from '../main.js';

interface Person {
  id: number;
  name: string;
  role: Role;
  sites: string[] | null;
  createdAt: string;
  revokedAt: string | null;
}
interface TokenInfo {
  id: number;
  userId: number;
  userName: string;
  name: string;
  createdAt: string;
  revokedAt: string | null;
}
interface Site {
  id: number;
  name: string;
  selfReviewAllowed: boolean;
}

const ROLES: [string, string][] = [
  ['technician', 'technician'],
  ['engineer', 'engineer'],
  ['auditor', 'auditor'],
  ['admin', 'admin'],
];
const sitesText = (s: string[] | null) => (s?.length ? s.join(', ') : 'every site');
const parseSites = (text: string) =>
  text
    .split(',')
    .map((x) => x.trim())
    .filter(Boolean);
const message = (e: unknown) => (e instanceof Error ? e.message : String(e));

export async function peoplePage({ user, main }: PageContext): Promise<void> {
  main.append(h('h1', {}, 'People and sites'));
  if (user.role !== 'admin' || user.sites !== null) {
    main.append(notice('info', 'People and sites are managed by an admin with no site limit.'));
    return;
  }
  const out = h('div', { 'aria-live': 'polite' });
  const lists = h('div', {});
  main.append(out, lists);

  async function draw(): Promise<void> {
    const [people, tokens, sites] = await Promise.all([
      api<{ items: Person[] }>('GET', '/api/people'),
      api<{ items: TokenInfo[] }>('GET', '/api/tokens'),
      api<{ items: Site[] }>('GET', '/api/sites'),
    ]);
    clear(lists);
    const act = (label: string, run: () => Promise<unknown>) => {
      const b = h('button', { type: 'button', class: 'quiet' }, label);
      b.addEventListener('click', async () => {
        try {
          await run();
          await draw();
        } catch (e) {
          out.replaceChildren(notice('error', message(e)));
        }
      });
      return b;
    };
    const personRows = people.items.map((p) => {
      const role = select('role', ROLES, p.role);
      const siteBox = h('input', {
        type: 'text',
        value: p.sites?.join(', ') ?? '',
        placeholder: 'every site',
        'aria-label': `sites of ${p.name}`,
      });
      const live = p.revokedAt === null;
      return [
        p.name,
        live ? role : p.role,
        live ? siteBox : sitesText(p.sites),
        live ? 'active' : `revoked ${dateTime(p.revokedAt)}`,
        live
          ? h(
              'span',
              {},
              act('Save', () =>
                api('PATCH', `/api/people/${p.id}`, {
                  role: role.value,
                  sites: parseSites(siteBox.value),
                }),
              ),
              act('New token', async () => {
                const r = await api<{ token: string }>('POST', `/api/people/${p.id}/tokens`, {
                  label: 'web',
                });
                out.replaceChildren(
                  notice(
                    'caution',
                    `Token for ${p.name}, shown this once — hand it over safely: `,
                    h('code', {}, r.token),
                  ),
                );
              }),
              act('Revoke', () => api('POST', `/api/people/${p.id}/revoke`)),
            )
          : '',
      ];
    });
    const tokenRows = tokens.items.map((t) => [
      t.userName,
      t.name,
      dateTime(t.createdAt),
      t.revokedAt
        ? `revoked ${dateTime(t.revokedAt)}`
        : act('Revoke', () => api('DELETE', `/api/tokens/${t.id}`)),
    ]);
    const siteRows = sites.items.map((s) => [
      s.name,
      s.selfReviewAllowed ? 'allowed (each one marked)' : 'four eyes',
      act(s.selfReviewAllowed ? 'Require four eyes' : 'Allow self-review', () =>
        api('PUT', `/api/sites/${encodeURIComponent(s.name)}/settings`, {
          selfReviewAllowed: !s.selfReviewAllowed,
        }),
      ),
    ]);
    lists.append(
      table(
        'People',
        ['Name', 'Role', 'Sites (comma-separated; blank: every site)', 'State', ''],
        personRows,
      ),
      table(
        'Access tokens (the secrets are never shown again)',
        ['Person', 'Label', 'Made', ''],
        tokenRows,
      ),
      table('Sites', ['Site', 'Approvals', ''], siteRows),
    );
  }

  const name = h('input', { type: 'text', name: 'name', required: true });
  const role = select('role', ROLES, 'technician');
  const sites = h('input', { type: 'text', name: 'sites', placeholder: 'every site' });
  const add = h('button', { type: 'submit', class: 'primary' }, 'Add person');
  const form = h(
    'form',
    { class: 'card' },
    h('h2', {}, 'Add a person'),
    field('Name', name),
    field('Role', role),
    field('Sites (comma-separated)', sites, 'blank: every site'),
    h('div', { class: 'actions' }, add),
  );
  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    try {
      await api('POST', '/api/people', {
        name: name.value.trim(),
        role: role.value,
        sites: parseSites(sites.value),
      });
      form.reset();
      out.replaceChildren(notice('info', 'Added. Make a token for them to sign in with.'));
      await draw();
    } catch (err) {
      out.replaceChildren(notice('error', err instanceof ApiError ? err.message : message(err)));
    }
  });
  main.append(form);
  await draw();
}
