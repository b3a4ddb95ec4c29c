/**
 * Loads the demo scenario listed in sample-data/manifest.json into an empty database
 * (format in server/store/README.md). Each listed item goes through the same path as the API:
 * vessel files through the vessel-file check, logs through upload → analysis → draft fit.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { isInputError } from '../core/errors.js';
import { checkVesselFile } from '../http/vessel-file.js';
import type { Actor, Store } from '../store/index.js';
import { uploadDrainTest } from './ingest.js';
import type { AnalyzeRunner } from './pool.js';

export interface DemoManifest {
  format: 'efflux-demo';
  version: 1;
  vessels: { file: string }[];
  tests?: {
    vessel: string;
    site?: string;
    outlet?: string;
    log: string;
    baro?: string;
    settings?: Record<string, unknown>;
    operator?: string;
    loggerId?: string;
    testedAt?: string;
    notes?: string;
    review?: { decision: 'approve' | 'reject'; comment?: string };
  }[];
  events?: {
    vessel: string;
    site?: string;
    outlet?: string;
    kind: 'cleaned' | 'replaced' | 'modified';
    occurredAt: string;
    notes?: string;
  }[];
}

export const DEMO_ACTOR: Actor = { id: null, name: 'demo-loader' };

export interface DemoReport {
  loaded: boolean;
  note: string;
  vessels: number;
  tests: number;
  events: number;
  skipped: string[];
}

export async function loadDemo(
  store: Store,
  analyze: AnalyzeRunner,
  manifestPath: string,
): Promise<DemoReport> {
  const report: DemoReport = {
    loaded: false,
    note: '',
    vessels: 0,
    tests: 0,
    events: 0,
    skipped: [],
  };
  if (!existsSync(manifestPath)) {
    report.note = `no demo scenario (${manifestPath} not found); starting empty`;
    return report;
  }
  const dir = dirname(manifestPath);
  const manifest = JSON.parse(readFileSync(manifestPath, 'utf8')) as DemoManifest;
  if (manifest.format !== 'efflux-demo' || manifest.version !== 1) {
    report.note = `${manifestPath}: not an efflux-demo manifest of version 1; skipped`;
    return report;
  }
  const skip = (what: string, e: unknown) => {
    report.skipped.push(`${what}: ${isInputError(e) ? e.toLine() : (e as Error).message}`);
  };
  const vesselId = (site: string | undefined, name: string) =>
    store.vessels.findId(site ?? 'main', name);
  for (const v of manifest.vessels ?? []) {
    try {
      const spec = checkVesselFile(JSON.parse(readFileSync(join(dir, v.file), 'utf8')), v.file);
      await store.vessels.create(DEMO_ACTOR, spec);
      report.vessels++;
    } catch (e) {
      skip(v.file, e);
    }
  }
  for (const t of manifest.tests ?? []) {
    try {
      const id = await vesselId(t.site, t.vessel);
      if (id === null) throw new Error(`vessel "${t.vessel}" is not in the manifest`);
      const vessel = await store.vessels.get(id);
      const outlet = t.outlet ? vessel.outlets.find((o) => o.key === t.outlet) : undefined;
      if (t.outlet && !outlet) throw new Error(`vessel "${t.vessel}" has no outlet "${t.outlet}"`);
      const read = (p: string) => ({
        bytes: readFileSync(join(dir, p)),
        fileName: p.split('/').pop()!,
      });
      const { fit } = await uploadDrainTest(store, analyze, DEMO_ACTOR, {
        vesselId: id,
        outletId: outlet?.id,
        log: read(t.log),
        baro: t.baro ? read(t.baro) : undefined,
        settings: t.settings ?? {},
        operator: t.operator,
        loggerId: t.loggerId,
        testedAt: t.testedAt,
        notes: t.notes,
      });
      if (t.review)
        await store.fits.review(
          DEMO_ACTOR,
          fit.id,
          t.review.decision === 'approve' ? 'approved' : 'rejected',
          t.review.comment ?? null,
        );
      report.tests++;
    } catch (e) {
      skip(t.log, e);
    }
  }
  for (const ev of manifest.events ?? []) {
    try {
      const id = await vesselId(ev.site, ev.vessel);
      if (id === null) throw new Error(`vessel "${ev.vessel}" is not in the manifest`);
      const outlet = ev.outlet
        ? (await store.vessels.get(id)).outlets.find((o) => o.key === ev.outlet)
        : undefined;
      await store.events.create(DEMO_ACTOR, {
        vesselId: id,
        outletId: outlet?.id ?? null,
        kind: ev.kind,
        occurredAt: ev.occurredAt,
        notes: ev.notes,
      });
      report.events++;
    } catch (e) {
      skip(`event ${ev.vessel} ${ev.occurredAt}`, e);
    }
  }
  report.loaded = true;
  report.note = `demo scenario loaded: ${report.vessels} vessels, ${report.tests} tests, ${report.events} maintenance events`;
  return report;
}
