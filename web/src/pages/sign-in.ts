import { api, type User } from '../api.js';
import { field, h, notice } from '../dom.js';

/** A token in (the demo prints one; `efflux token create` makes more); a session cookie out. */
export async function signInPage(main: HTMLElement, done: (u: User) => void): Promise<void> {
  const token = h('input', {
    type: 'password',
    name: 'token',
    autocomplete: 'off',
    required: true,
    spellcheck: 'false',
  });
  const status = h('div', { 'aria-live': 'polite' });
  const form = h(
    'form',
    { class: 'card sign-in' },
    h('h1', { tabindex: -1 }, 'Sign in'),
    h(
      'p',
      {},
      'Paste the access token you were given. The first start of the service prints one for the administrator; an administrator makes more with ',
      h('code', {}, 'efflux token create --role ROLE --name NAME'),
      '.',
    ),
    field('Access token', token),
    h('button', { type: 'submit', class: 'primary' }, 'Sign in'),
    status,
  );
  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    status.replaceChildren();
    try {
      const r = await api<{ user: User }>('POST', '/api/session', { token: token.value.trim() });
      done(r.user);
    } catch (err) {
      status.append(notice('error', err instanceof Error ? err.message : String(err)));
      token.focus();
    }
  });
  main.append(form);
  token.focus();
}
