import { openSync, readSync, closeSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { InputError } from '../core/errors.js';
import { EXIT_OK, guarded } from './io.js';
import { READ_OPTIONS, parseCommandLine, settingsFrom } from './options.js';

const USAGE = `usage: efflux watch <log file> --vessel ID --to URL [options]

Tails a logger file as it grows and sends each new whole row to a live drain test on an efflux
service, so the workbench can show the fit while the tank drains. Rows are acknowledged by the
service: started again with --live ID, it sends from the last row the service holds (nothing lost,
nothing sent twice).

  --vessel ID            the vessel's id on the service
  --to URL               the service, e.g. http://127.0.0.1:8080
  --token TOKEN          API token (default: the EFFLUX_TOKEN environment variable)
  --outlet ID            the outlet tested (when the vessel has several)
  --live ID              resume this live test instead of opening a new one
  --target PERCENT       the u_r(Cd·a) that means "enough data" (default: u_r(Cd) 1 %)
  --target-cd PERCENT    the same for u_r(Cd)
  --poll DURATION        how often the file is looked at (default 1s)
  --close-after DURATION close the test (store it as an upload) once the file has not grown for this long
  reading options as for efflux fit: --unit, --quantity, --time-column, --level-column, --date-order, --tz, --delimiter, --decimal
exit codes: 0 done (or stopped with Ctrl-C: the test stays open; resume with --live), 2 refused, other: fault.
`;

function seconds(option: string, text: string): number {
  const m = /^\s*(\d+(?:\.\d*)?)\s*(ms|s|min)?\s*$/.exec(text);
  if (!m)
    throw new InputError(`${option}: cannot read "${text}" as a duration (e.g. 1s, 500ms, 2min)`, {
      field: option,
    });
  return Number(m[1]) * (m[2] === 'ms' ? 0.001 : m[2] === 'min' ? 60 : 1);
}

function fraction(option: string, text: string): number {
  const t = text.trim();
  const v = t.endsWith('%') ? Number(t.slice(0, -1)) / 100 : Number(t);
  if (!Number.isFinite(v) || v <= 0)
    throw new InputError(`${option}: "${text}" is not a positive percentage`, { field: option });
  return v;
}

/** Bytes [from, size) of the file, cut after the last line feed (a half-written row waits). */
function wholeRows(path: string, from: number, size: number): Buffer {
  const fd = openSync(path, 'r');
  try {
    const buf = Buffer.alloc(size - from);
    let got = 0;
    while (got < buf.length) {
      const n = readSync(fd, buf, got, buf.length - got, from + got);
      if (n === 0) break;
      got += n;
    }
    const last = buf.subarray(0, got).lastIndexOf(0x0a);
    return buf.subarray(0, last + 1);
  } finally {
    closeSync(fd);
  }
}

export async function run(argv: string[]): Promise<number> {
  return guarded(async () => {
    const { values, positionals } = parseCommandLine(argv, {
      ...READ_OPTIONS,
      vessel: { type: 'string' },
      to: { type: 'string' },
      token: { type: 'string' },
      outlet: { type: 'string' },
      live: { type: 'string' },
      target: { type: 'string' },
      'target-cd': { type: 'string' },
      poll: { type: 'string' },
      'close-after': { type: 'string' },
    });
    if (values.help) {
      process.stdout.write(USAGE);
      return EXIT_OK;
    }
    const path = positionals[0];
    if (!path || positionals.length > 1)
      throw new InputError(
        'give one log file to watch (usage: efflux watch <file> --vessel ID --to URL)',
      );
    if (!values.to)
      throw new InputError('no service given: add --to URL (e.g. http://127.0.0.1:8080)');
    const token = values.token ?? process.env.EFFLUX_TOKEN;
    if (!token)
      throw new InputError(
        'no API token: add --token or set EFFLUX_TOKEN (efflux token create --role technician --name NAME)',
      );
    if (!values.live && !values.vessel)
      throw new InputError('no vessel given: add --vessel ID (or --live ID to resume)');
    const base = values.to.replace(/\/+$/, '');
    const pollS = values.poll ? seconds('--poll', values.poll) : 1;
    const closeAfterS = values['close-after']
      ? seconds('--close-after', values['close-after'])
      : null;
    const auth = { authorization: `Bearer ${token}` };
    const say = (line: string) => process.stderr.write(`${line}\n`);

    const call = async (method: string, url: string, body?: Buffer | string, type?: string) => {
      const res = await fetch(`${base}${url}`, {
        method,
        headers: { ...auth, ...(type ? { 'content-type': type } : {}) },
        body: body as never,
      });
      const text = await res.text();
      let json: Record<string, unknown> = {};
      try {
        json = text ? JSON.parse(text) : {};
      } catch {
        /* not JSON */
      }
      return { status: res.status, json, headers: res.headers };
    };
    const refuse = (what: string, r: { status: number; json: Record<string, unknown> }) =>
      new InputError(
        `${what}: the service answered ${r.status}${r.json.detail ? ` (${String(r.json.detail)})` : ''}`,
      );

    let id = values.live;
    let acked = 0;
    if (id) {
      const r = await call('GET', `/api/live/${encodeURIComponent(id)}`);
      if (r.status !== 200) throw refuse(`live test ${id}`, r);
      acked = Number(r.json.receivedBytes);
      say(`resuming live test ${id} from byte ${acked} (${r.json.rows} rows held)`);
    } else {
      const body: Record<string, unknown> = { fileName: basename(path) };
      const settings = settingsFrom(values);
      if (Object.keys(settings).length) body.settings = settings;
      if (values.outlet) body.outletId = Number(values.outlet);
      if (values.target)
        body.target = {
          quantity: 'effective-area',
          relativeStandardUncertainty: fraction('--target', values.target),
        };
      if (values['target-cd'])
        body.target = {
          quantity: 'discharge-coefficient',
          relativeStandardUncertainty: fraction('--target-cd', values['target-cd']),
        };
      const r = await call(
        'POST',
        `/api/vessels/${encodeURIComponent(values.vessel!)}/live`,
        JSON.stringify(body),
        'application/json',
      );
      if (r.status !== 201) throw refuse('opening the live test', r);
      id = String(r.json.id);
      say(`live test ${id} opened; to resume: efflux watch ${path} --live ${id} --to ${base}`);
    }
    process.stdout.write(`${id}\n`);

    let stop = false;
    const onSignal = () => {
      stop = true;
    };
    process.once('SIGINT', onSignal);
    process.once('SIGTERM', onSignal);
    let lastGrowth = Date.now();
    let lastMessage = '';
    let offline = false;
    while (!stop) {
      let size = 0;
      try {
        size = statSync(path).size;
      } catch {
        throw new InputError('cannot be read', { file: path });
      }
      if (size < acked)
        throw new InputError(
          `the file is now ${size} bytes, shorter than the ${acked} already sent: it was replaced, not appended to`,
          { file: path },
        );
      const rows = size > acked ? wholeRows(path, acked, size) : Buffer.alloc(0);
      if (rows.length > 0) {
        try {
          const r = await call(
            'POST',
            `/api/live/${id}/rows?offset=${acked}`,
            rows,
            'application/octet-stream',
          );
          if (offline) say('connection back');
          offline = false;
          if (r.status === 200) {
            acked = Number(r.json.receivedBytes);
            lastGrowth = Date.now();
            const latest = r.json.latest as { message?: string } | null;
            if (latest?.message && latest.message !== lastMessage)
              say((lastMessage = latest.message));
          } else if (r.status === 409 && r.headers.get('efflux-received-bytes')) {
            acked = Number(r.headers.get('efflux-received-bytes'));
          } else {
            throw refuse('sending rows', r);
          }
        } catch (e) {
          if (e instanceof InputError) throw e;
          if (!offline) say(`cannot reach ${base} (${(e as Error).message}); trying again`);
          offline = true;
        }
      }
      if (
        closeAfterS !== null &&
        acked > 0 &&
        rows.length === 0 &&
        Date.now() - lastGrowth >= closeAfterS * 1000
      ) {
        const r = await call('POST', `/api/live/${id}/close`);
        if (r.status !== 201) throw refuse('closing the live test', r);
        const test = r.json.test as { id: number; sha256: string };
        say(`closed: stored as test ${test.id} (SHA-256 ${test.sha256})`);
        return EXIT_OK;
      }
      await sleep(pollS * 1000);
    }
    say(`stopped; live test ${id} stays open with ${acked} bytes: resume with --live ${id}`);
    return EXIT_OK;
  });
}
