/**
 * Bundles the workbench into one folder the service serves (EFFLUX_WEB_ROOT, default dist/web):
 * index.html, app.js (the pages and uPlot, one ES module) and app.css (uPlot's sheet, then ours).
 * No inline script or style anywhere: the service's Content-Security-Policy allows 'self' only.
 * Run as a script it writes dist/web; tests call buildWeb(folder) for a temporary one.
 */
import { build } from 'esbuild';
import { copyFileSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = fileURLToPath(new URL('.', import.meta.url));
const root = resolve(here, '..');

export async function buildWeb(outDir: string): Promise<string[]> {
  mkdirSync(outDir, { recursive: true });
  await build({
    entryPoints: [join(here, 'src/main.ts')],
    bundle: true,
    format: 'esm',
    target: 'es2020',
    minify: true,
    sourcemap: true,
    outfile: join(outDir, 'app.js'),
    logLevel: 'warning',
    legalComments: 'eof',
  });
  const css = [
    readFileSync(join(root, 'node_modules/uplot/dist/uPlot.min.css'), 'utf8'),
    readFileSync(join(here, 'styles.css'), 'utf8'),
  ].join('\n');
  writeFileSync(join(outDir, 'app.css'), css);
  copyFileSync(join(here, 'index.html'), join(outDir, 'index.html'));
  return ['index.html', 'app.js', 'app.css'];
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const out = resolve(root, process.argv[2] ?? 'dist/web');
  await buildWeb(out);
  process.stdout.write(`web workbench built into ${out}\n`);
}
