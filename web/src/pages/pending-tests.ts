/**
 * Tests stored but not analysed (a timeout, a fault, a full disk): what went wrong, and buttons to
 * analyse again (technicians up) or withdraw with a reason (engineers up). Drawn on the vessel page.
 */
import { api, ApiError, canReview, canUpload, type DrainTest, type User } from '../api.js';
import { h, notice, table } from '../dom.js';
import { countText, date } from '../format.js';

export function pendingSection(
  user: User,
  tests: DrainTest[],
  reload: () => void,
): HTMLElement | null {
  const waiting = tests.filter((t) => t.status === 'pending');
  if (!waiting.length) return null;
  const section = h(
    'section',
    { class: 'pending-tests' },
    h('h2', {}, 'Tests waiting for analysis'),
  );
  const message = h('div', { 'aria-live': 'polite' });
  const act = async (button: HTMLButtonElement, run: () => Promise<unknown>) => {
    button.disabled = true;
    message.replaceChildren();
    try {
      await run();
      reload();
    } catch (e) {
      message.append(
        notice('error', e instanceof ApiError || e instanceof Error ? e.message : String(e)),
      );
      button.disabled = false;
    }
  };
  const rows = waiting.map((t) => {
    const state = t.stuck
      ? `failed ${t.failedAttempts ?? 0} times; no longer retried on its own`
      : t.failedAttempts
        ? `failed ${countText(t.failedAttempts, 'time')}; retried at the next start`
        : 'being analysed, or waiting for the next start';
    const controls = h('div', { class: 'actions' });
    if (canUpload(user)) {
      const retry = h('button', { type: 'button', 'data-action': 'retry' }, 'Analyse again');
      retry.addEventListener(
        'click',
        () => void act(retry, () => api('POST', `/api/tests/${t.id}/retry`)),
      );
      controls.append(retry);
    }
    if (canReview(user)) {
      const reason = h('input', {
        type: 'text',
        name: `reason-${t.id}`,
        maxlength: '500',
        placeholder: 'reason (kept in the audit log)',
        'aria-label': `Reason to withdraw ${t.fileName}`,
      });
      const withdraw = h(
        'button',
        { type: 'button', class: 'quiet', 'data-action': 'withdraw' },
        'Withdraw',
      );
      withdraw.addEventListener('click', () => {
        if (!reason.value.trim()) {
          message.replaceChildren(
            notice('error', 'Give a reason to withdraw the test; it is kept in the audit log.'),
          );
          reason.focus();
          return;
        }
        void act(withdraw, () =>
          api('POST', `/api/tests/${t.id}/withdraw`, { reason: reason.value.trim() }),
        );
      });
      controls.append(reason, withdraw);
    }
    return [
      date(t.createdAt),
      t.fileName,
      h('span', { class: t.stuck ? 'badge badge-rejected' : 'badge' }, state),
      t.lastFailure ?? '—',
      controls,
    ];
  });
  section.append(
    table(
      'Tests stored but not analysed',
      ['Uploaded', 'Logger file', 'State', 'Last failure', ''],
      rows,
    ),
    message,
  );
  return section;
}
