import { readLevelLog } from '../ingest/read-log.js';
import type { DateOrder } from '../ingest/options.js';
import { fluidDensityKgM3 } from '../vessel/schema.js';
import type { LogForSystem } from './align.js';
import type { SystemSpec } from './schema.js';

/** Reading settings that apply to every log of a system test. */
export interface SystemReadSettings {
  unit?: string;
  tz?: string;
  dateOrder?: DateOrder;
  delimiter?: string;
  decimal?: '.' | ',';
}

/**
 * One vessel's level log, read with that vessel's fluid, sensor and gravity, the way the
 * single-vessel analysis reads it (a fluid density wins over a temperature column; a fluid
 * temperature stands in when the log has none). Shared by `efflux fit-system` and the API.
 */
export function readVesselLog(
  spec: SystemSpec,
  vessel: number,
  gravity: number,
  file: { bytes: Uint8Array; fileName: string },
  settings: SystemReadSettings,
): LogForSystem {
  const v = spec.vessels[vessel];
  const density = fluidDensityKgM3(v);
  const series = readLevelLog(file.bytes, file.fileName, {
    ...settings,
    fluidDensityKgM3: v.fluid && 'densityKgM3' in v.fluid ? density.value : undefined,
    fallbackDensity:
      v.fluid && 'temperatureC' in v.fluid
        ? { valueKgM3: density.value, source: density.source }
        : undefined,
    mountElevationM: v.sensor?.mountElevationM,
    zeroElevationM: v.sensor?.zeroElevationM,
    gravityMS2: gravity,
  });
  return {
    vessel,
    fileName: file.fileName,
    timeS: series.timeS,
    levelM: series.levelM,
    t0EpochMs: series.t0EpochMs,
  };
}
