/**
 * Versions, stored with every fit so a refit can say what produced it. PACKAGE_VERSION is
 * package.json's version; ENGINE_VERSION adds the first 12 hex digits of a SHA-256 over
 * server/core's sources, so it changes whenever the numerical code does (semver build metadata:
 * `0.1.0+core.1a2b3c4d5e6f`). Both come from engine-build.generated.ts, written at build time by
 * scripts/engine-version.mjs. Fits stored before this scheme carry the plain package version.
 */
import { CORE_SOURCES_SHA256, PACKAGE_VERSION } from './engine-build.generated.js';

export { PACKAGE_VERSION };
export const ENGINE_VERSION = `${PACKAGE_VERSION}+core.${CORE_SOURCES_SHA256.slice(0, 12)}`;
