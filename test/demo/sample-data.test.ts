import { readFileSync, readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { analyzeDrainTest } from '../../server/core/analyze.js';
import { parseVesselFile } from '../../server/core/vessel/schema.js';
import { buildSampleData } from '../../server/demo/build.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const dir = join(root, 'sample-data');
const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8'));
const vesselFileByName = new Map<string, string>();
for (const v of manifest.vessels)
  vesselFileByName.set(JSON.parse(readFileSync(join(dir, v.file), 'utf8')).name, v.file);

describe('sample-data: the invented scenario', () => {
  it('is exactly what the generator writes (seeded, so regenerating changes nothing)', () => {
    const built = buildSampleData();
    // systems/ has its own generator and test (test/demo/systems.test.ts)
    const onDisk = readdirSync(dir, { recursive: true, withFileTypes: true })
      .filter((e) => e.isFile() && e.name !== 'README.md')
      .map((e) =>
        join(e.parentPath, e.name)
          .slice(dir.length + 1)
          .split('\\')
          .join('/'),
      )
      .filter((f) => !f.startsWith('systems/'));
    expect(onDisk.sort()).toEqual(Object.keys(built).sort());
    for (const [name, bytes] of Object.entries(built))
      expect(Buffer.compare(Buffer.from(bytes), readFileSync(join(dir, name)))).toBe(0);
  });

  it('has at least eight logger files in different layouts', () => {
    expect(
      new Set(manifest.tests.map((t: { layout: string }) => t.layout)).size,
    ).toBeGreaterThanOrEqual(8);
  });

  for (const t of manifest.tests) {
    it(`${t.log}: the recorded Cd ${t.truth.dischargeCoefficient} comes back within 0.5 % with only the stated settings`, () => {
      const vesselFile = vesselFileByName.get(t.vessel)!;
      const vessel = parseVesselFile(readFileSync(join(dir, vesselFile), 'utf8'), vesselFile);
      const log = { bytes: new Uint8Array(readFileSync(join(dir, t.log))), fileName: t.log };
      const baro = t.baro
        ? { bytes: new Uint8Array(readFileSync(join(dir, t.baro))), fileName: t.baro }
        : undefined;
      const { fit } = analyzeDrainTest({
        log,
        baro,
        vessel,
        vesselFileName: vesselFile,
        settings: t.settings,
      });
      expect(fit.converged).toBe(true);
      const cd = fit.dischargeCoefficient!;
      expect(Math.abs(cd.value / t.truth.dischargeCoefficient - 1)).toBeLessThan(0.005);
      expect(cd.ci95![0]).toBeLessThanOrEqual(t.truth.dischargeCoefficient);
      expect(cd.ci95![1]).toBeGreaterThanOrEqual(t.truth.dischargeCoefficient);
    });
  }
});
