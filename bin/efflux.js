#!/usr/bin/env node
// Thin launcher: the compiled CLI lives in dist/ (npm ci runs the build through "prepare").
import('../dist/server/cli/main.js').catch((err) => {
  if (err && err.code === 'ERR_MODULE_NOT_FOUND') {
    process.stderr.write('efflux: the program is not built yet; run `npm run build` first\n');
    process.exit(70);
  }
  throw err;
});
