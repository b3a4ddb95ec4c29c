/**
 * `efflux vessel …` and `efflux outlet threshold` against a data folder, and outlet tags and site
 * parts wherever the CLI names them (trend, export). Invented vessels at fictional sites.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { openStore } from '../../server/store/index.js';
import { effluxWithData, root } from './run-cli.js';

const D2_FILE = join(root, 'sample-data/day-tank-d2.vessel.json');
const D2 = JSON.parse(readFileSync(D2_FILE, 'utf8'));

let dir: string;
let work: string;
const run = (...args: string[]) => effluxWithData(dir, args);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'efflux-vessel-cli-'));
  work = mkdtempSync(join(tmpdir(), 'efflux-vessel-files-'));
});

// each case starts the CLI several times (about 2 s each on a quiet machine, far more under load)
describe('efflux vessel and outlet commands', { timeout: 240_000 }, () => {
  it('adds a vessel file and exports it back equal to the input (SI units)', () => {
    const add = run('vessel', 'add', D2_FILE);
    expect(add.stderr).toBe('');
    expect(add.code).toBe(0);
    expect(add.stdout).toMatch(
      /^vessel 1 \[D-2\] "Day tank D-2", site Kestrel Fen works \(fictional\), revision 1/,
    );
    const out = run('vessel', 'export', 'd-2');
    expect(out.code).toBe(0);
    expect(JSON.parse(out.stdout)).toEqual(D2);
    const show = run('vessel', 'show', 'Day tank D-2');
    expect(show.code).toBe(0);
    expect(show.stdout).toContain(
      'outlet 1 "bottom": square-edged-short-tube, bore 0.025 m ± 0.0001 m',
    );
  });

  it('refuses a bad vessel file with the file and field named, exit 2, nothing stored', () => {
    const bad = join(work, 'bad.vessel.json');
    writeFileSync(
      bad,
      JSON.stringify({
        ...D2,
        name: 'Bad tank',
        shape: { kind: 'horizontal-cylinder', diameterM: -1.8, lengthM: 4.5 },
      }),
    );
    const r = run('vessel', 'add', bad);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      'efflux: bad.vessel.json, field shape.diameterM: must be a positive number (got -1.8)\n',
    );
    expect(run('vessel', 'list').stdout).not.toContain('Bad tank');
  });

  it('edit makes a new revision; the earlier one stays readable', () => {
    const edited = { ...D2, shape: { ...D2.shape, lengthM: 4.6 } };
    const f = join(work, 'd2-edited.json');
    writeFileSync(f, JSON.stringify(edited));
    const r = run('vessel', 'edit', '1', f);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('revision 2');
    expect(JSON.parse(run('vessel', 'export', 'D-2').stdout)).toEqual(edited);
    expect(JSON.parse(run('vessel', 'export', 'D-2', '--revision', '1').stdout)).toEqual(D2);
    const revs = run('vessel', 'revisions', 'D-2');
    expect(
      revs.stdout
        .split('\n')
        .filter(Boolean)
        .map((l) => l.split('  ')[0]),
    ).toEqual(['revision 2', 'revision 1']);
  });

  it('names outlets by tag; a tag on two sites is an error listing both, exit 2', () => {
    const north = { ...D2, site: 'North yard (fictional)' };
    const f = join(work, 'north.json');
    writeFileSync(f, JSON.stringify(north));
    expect(run('vessel', 'add', f).code).toBe(0);
    const amb = run('trend', 'D-2');
    expect(amb.code).toBe(2);
    expect(amb.stderr).toContain('"D-2" names 2 outlets');
    expect(amb.stderr).toContain(
      'D-2/bottom (outlet 1, Day tank D-2, site Kestrel Fen works (fictional))',
    );
    expect(amb.stderr).toContain(
      'D-2/bottom (outlet 2, Day tank D-2, site North yard (fictional))',
    );
    const one = run('trend', 'D-2', '--site', 'NORTH', '--json');
    expect(one.code).toBe(0);
    expect(JSON.parse(one.stdout).outlet.id).toBe(2);
    expect(run('trend', 'nothing-here').stderr).toContain('no outlet tagged "nothing-here"');
  });

  it('efflux trend FD-2 finds the demo FD-2 vessel by the tag painted on it', () => {
    expect(run('vessel', 'add', join(root, 'sample-data/filter-drain-fd2.vessel.json')).code).toBe(
      0,
    );
    const r = run('trend', 'FD-2', '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).outlet).toMatchObject({
      key: 'drain',
      vesselName: 'Filter drain tank FD-2',
    });
  });

  it('sets an outlet threshold by tag, as a new audited vessel revision', async () => {
    const r = run('outlet', 'threshold', 'D-2/bottom', '0.85', '--site', 'kestrel');
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('outlet 1 "bottom"');
    expect(r.stdout).toContain('vessel revision 3');
    expect(JSON.parse(run('vessel', 'export', '1').stdout).outlet.actionThreshold).toBe(0.85);
    expect(run('outlet', 'threshold', '1', '1').code).toBe(2);
    const store = await openStore({ dataDir: dir });
    try {
      const row = await store.sql.get(
        `SELECT actor_name, action FROM audit_log WHERE entity_type = 'vessel' AND entity_id = '1' ORDER BY seq DESC LIMIT 1`,
      );
      expect(row).toEqual({ actor_name: 'system', action: 'vessel.update' });
    } finally {
      await store.close();
    }
  });

  it('site filters match part of a name in any case and say which sites matched', () => {
    const fleet = run('trend', '--fleet', '--site', 'fen');
    expect(fleet.code).toBe(0);
    expect(fleet.stdout).toContain('site filter "fen" matched site: Kestrel Fen works (fictional)');
    const both = run('vessel', 'list', '--site', '(FICTIONAL)');
    expect(both.stdout).toContain(
      'matched 2 sites: Kestrel Fen works (fictional); North yard (fictional)',
    );
    const ex = run('export', '--site', 'Fen', '--out', join(work, 'x.zip'));
    expect(ex.stdout).toContain('matched site: Kestrel Fen works (fictional)');
    expect(ex.code).toBe(2); // no approved fits here: refused, after saying which site it read
    const none = run('export', '--site', 'south', '--out', join(work, 'y.zip'));
    expect(none.code).toBe(2);
    expect(none.stderr).toContain(
      'no site name contains "south"; the sites are: Kestrel Fen works (fictional), North yard (fictional)',
    );
  });
});
