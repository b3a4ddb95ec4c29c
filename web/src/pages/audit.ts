/**
 * The auditor's view: the audit log, newest first, filtered by vessel, person, kind of action and
 * date (actions in plain words from core/audit/action-labels.ts), the hash-chain check,
 * links to every fit's PDF report and each outlet's report, and the period export (zip).
 * Auditors and admins only (the service refuses the others; the page says so).
 */
import { api, ApiError, type Page, type Vessel } from '../api.js';
import { field, h, notice, select } from '../dom.js';
import { dateTime } from '../format.js';
import type { PageContext } from '../main.js';
import type { AuditEntry } from '../../../server/store/audit.js';
import { actionGroups, actionLabel } from '../../../server/core/audit/action-labels.js';

/** An audit entry as the service sends it (server/store/audit.ts, type-only). */
type Entry = AuditEntry;

const PAGE = 200;

export async function auditPage({ user, main }: PageContext): Promise<void> {
  main.append(
    h('h1', {}, 'Audit log'),
    h(
      'p',
      { class: 'lede' },
      'Every change the service made, newest first, each entry sealed with the hash of the one before. Filter it, check the chain, open the reports, and export a period.',
    ),
  );
  if (user.role !== 'auditor' && user.role !== 'admin') {
    main.append(notice('info', 'The audit log is open to auditors and administrators.'));
    return;
  }
  const vessels = await api<Page<Vessel>>('GET', '/api/vessels?limit=500');
  const vessel = select('vesselId', [
    ['', 'every vessel'],
    ...vessels.items.map((v): [string, string] => [String(v.id), `${v.name} (${v.site})`]),
  ]);
  const person = select('actorId', [['', 'everyone']]);
  // the kinds of action, in plain words, grouped by what they act on
  const action = h(
    'select',
    { name: 'action' },
    h('option', { value: '' }, 'every action'),
    ...actionGroups().map((g) =>
      h(
        'optgroup',
        { label: g.group },
        ...g.actions.map((a) => h('option', { value: a.action }, a.label)),
      ),
    ),
  );
  const since = h('input', { type: 'date', name: 'since' });
  const until = h('input', { type: 'date', name: 'until' });
  const show = h('button', { type: 'submit', class: 'primary' }, 'Show entries');
  const check = h('button', { type: 'button' }, 'Check the chain');
  const chain = h('div', { 'aria-live': 'polite', class: 'chain-result' });
  const reports = h('div', { class: 'outlet-reports' });
  const count = h('p', { class: 'count', 'aria-live': 'polite' });
  const body = h('tbody');
  const more = h('button', { type: 'button', hidden: true }, 'Show more');
  const filters = h(
    'form',
    { class: 'filters audit-filters' },
    field('Vessel', vessel),
    field('Person', person),
    field('What happened', action),
    field('From (inclusive)', since),
    field('Until (inclusive)', until),
    h('div', { class: 'actions' }, show),
  );
  main.append(
    h(
      'section',
      {},
      h(
        'div',
        { class: 'actions' },
        check,
        h('span', { class: 'hint' }, 'walks every entry and recomputes its hash'),
      ),
      chain,
    ),
    filters,
    reports,
    count,
    h(
      'div',
      { class: 'table-wrap' },
      h(
        'table',
        { class: 'audit' },
        h('caption', { class: 'visually-hidden' }, 'Audit entries'),
        h(
          'thead',
          {},
          h(
            'tr',
            {},
            ['No.', 'When (UTC)', 'Who', 'What happened', 'On', 'Reports', 'Hash'].map((t) =>
              h('th', { scope: 'col' }, t),
            ),
          ),
        ),
        body,
      ),
    ),
    more,
    exportForm(vessels.items),
  );

  const people = new Map<string, string>();
  // newest first: each page ends before the oldest entry shown so far
  let before: number | null = null;
  const query = () => {
    const q = new URLSearchParams({ limit: String(PAGE), order: 'newest' });
    if (before !== null) q.set('beforeSeq', String(before));
    if (vessel.value) q.set('vesselId', vessel.value);
    if (person.value) q.set('actorId', person.value);
    if (action.value) q.set('action', action.value);
    if (since.value) q.set('since', since.value);
    // "until" is exclusive in the API: the day after, so the chosen day is included
    if (until.value)
      q.set('until', new Date(Date.parse(until.value) + 86400_000).toISOString().slice(0, 10));
    return q;
  };
  const row = (e: Entry) => {
    const id = e.entityId;
    const on =
      id === null
        ? e.entityType
        : e.entityType === 'fit'
          ? h('a', { href: `#/fits/${id}` }, `fit ${id}`)
          : e.entityType === 'vessel'
            ? h('a', { href: `#/vessels/${id}` }, `vessel ${id}`)
            : `${e.entityType.replace('-', ' ')} ${id}`;
    const links =
      e.entityType === 'fit' && id
        ? h('a', { href: `/api/fits/${id}/report.pdf` }, 'fit report (PDF)')
        : e.entityType === 'outlet' && id
          ? h('a', { href: `/api/outlets/${id}/report.pdf` }, 'outlet report (PDF)')
          : '';
    return h(
      'tr',
      { 'data-seq': e.seq },
      h('td', { class: 'num' }, String(e.seq)),
      h('td', {}, dateTime(e.at).replace(' UTC', '')),
      h('td', {}, e.actorName),
      h('td', { title: e.action }, actionLabel(e.action)),
      h('td', {}, on),
      h('td', {}, links),
      h('td', {}, h('code', { title: e.hash }, e.hash.slice(0, 12) + '…')),
    );
  };
  let shown = 0;
  const load = async (fresh: boolean) => {
    if (fresh) {
      before = null;
      shown = 0;
      body.replaceChildren();
    }
    const page = await api<{ items: Entry[]; nextBeforeSeq?: number | null }>(
      'GET',
      `/api/audit?${query().toString()}`,
    );
    for (const e of page.items)
      if (e.actorId !== null && !people.has(String(e.actorId)))
        people.set(String(e.actorId), e.actorName);
    if (person.options.length - 1 < people.size) {
      const keep = person.value;
      person.replaceChildren(
        h('option', { value: '' }, 'everyone'),
        ...[...people]
          .sort((a, b) => a[1].localeCompare(b[1]))
          .map(([v, name]) => h('option', { value: v }, name)),
      );
      person.value = keep;
    }
    body.append(...page.items.map(row));
    shown += page.items.length;
    const next = page.nextBeforeSeq ?? null;
    before = next;
    more.hidden = next === null;
    count.textContent = `${shown} entr${shown === 1 ? 'y' : 'ies'} shown, newest first${next !== null ? ' (older ones below)' : ''}`;
  };
  const outletReports = () => {
    reports.replaceChildren();
    const v = vessels.items.find((x) => String(x.id) === vessel.value);
    if (!v) return;
    reports.append(
      h(
        'p',
        {},
        `Outlet reports of ${v.name}: `,
        ...v.outlets.flatMap((o, i) => [
          i ? ' · ' : '',
          h('a', { href: `/api/outlets/${o.id}/report.pdf` }, `outlet ${o.key} (PDF)`),
        ]),
      ),
    );
  };
  filters.addEventListener('submit', (ev) => {
    ev.preventDefault();
    outletReports();
    void load(true).catch((e) =>
      count.replaceChildren(notice('error', e instanceof Error ? e.message : String(e))),
    );
  });
  more.addEventListener('click', () => void load(false));
  check.addEventListener('click', async () => {
    chain.replaceChildren();
    check.disabled = true;
    try {
      const r = await api<{
        ok: boolean;
        count: number;
        head: string;
        brokenAt?: number;
        reason?: string;
      }>('GET', '/api/audit/verify');
      chain.append(
        r.ok
          ? notice(
              'info',
              h('strong', {}, 'The chain is intact. '),
              `${r.count} entries checked; the latest hash is `,
              h('code', {}, r.head),
              '.',
            )
          : notice(
              'error',
              h('strong', {}, `The chain is broken at entry ${r.brokenAt}. `),
              r.reason ?? '',
              ` (${r.count} entries read).`,
            ),
      );
    } catch (e) {
      chain.append(notice('error', e instanceof ApiError ? e.message : String(e)));
    } finally {
      check.disabled = false;
    }
  });
  await load(true);
}

/** An export job as the service reports it (server/jobs/exports.ts). */
interface ExportJob {
  id: string;
  state: 'running' | 'done' | 'failed';
  done: number;
  total: number;
  bytes: number | null;
  error: string | null;
  statusUrl: string;
  archiveUrl: string | null;
}

function exportForm(vessels: Vessel[]): HTMLElement {
  const sites = [...new Set(vessels.map((v) => v.site))].sort();
  const site = select('site', [['', 'every site'], ...sites.map((s): [string, string] => [s, s])]);
  const vessel = select('vessel', [
    ['', 'every vessel'],
    ...vessels.map((v): [string, string] => [v.name, v.name]),
  ]);
  const from = h('input', { type: 'date', name: 'from' });
  const to = h('input', { type: 'date', name: 'to' });
  const go = h('button', { type: 'submit', class: 'primary' }, 'Make the export');
  const out = h('div', { 'aria-live': 'polite' });
  const form = h(
    'form',
    { class: 'export-form' },
    h(
      'fieldset',
      {},
      h('legend', {}, 'Export approved fits'),
      h(
        'p',
        { class: 'hint' },
        'A zip of each fit’s PDF report, a CSV summary, the audit entries of the period and a SHA-256 manifest of every file.',
      ),
      h(
        'div',
        { class: 'grid' },
        field('Site', site),
        field('Vessel', vessel),
        field('From', from),
        field('To', to),
      ),
      h('div', { class: 'actions' }, go),
    ),
    out,
  );
  form.addEventListener('submit', async (ev) => {
    ev.preventDefault();
    out.replaceChildren();
    go.disabled = true;
    const body: Record<string, string> = {};
    if (site.value) body.site = site.value;
    if (vessel.value) body.vessel = vessel.value;
    if (from.value) body.from = from.value;
    if (to.value) body.to = to.value;
    try {
      // the service makes the export as a job (POST → 202); show its progress until the zip is ready
      let job = await api<ExportJob>('POST', '/api/exports', body);
      const bar = h('progress', {
        max: String(Math.max(1, job.total)),
        value: '0',
        id: 'export-progress',
      });
      const words = h('span', {}, `0 of ${job.total} reports made`);
      out.append(h('p', { class: 'export-progress' }, bar, ' ', words));
      while (job.state === 'running') {
        await new Promise((r) => setTimeout(r, 500));
        job = await api<ExportJob>('GET', job.statusUrl);
        bar.max = Math.max(1, job.total);
        bar.value = job.done;
        words.textContent = `${job.done} of ${job.total} reports made`;
      }
      out.replaceChildren();
      if (job.state === 'failed' || !job.archiveUrl)
        throw new Error(job.error ?? 'the export failed');
      const link = h(
        'a',
        { href: job.archiveUrl, download: 'efflux-export.zip', class: 'button', id: 'export-link' },
        `Save efflux-export.zip (${((job.bytes ?? 0) / 1024).toFixed(0)} KiB, ${job.total} reports)`,
      );
      out.append(notice('info', 'The export is ready. ', link));
      link.click();
    } catch (e) {
      out.append(notice('error', e instanceof Error ? e.message : String(e)));
    } finally {
      go.disabled = false;
    }
  });
  return h('section', {}, h('h2', {}, 'Export'), form);
}
