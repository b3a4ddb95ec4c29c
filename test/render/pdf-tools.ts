import { spawnSync } from 'node:child_process';

/** poppler-utils (Debian): skip loudly outside CI when missing, fail in CI (.ci/run installs it). */
export function havePoppler(): boolean {
  const ok =
    spawnSync('pdftotext', ['-v']).status === 0 && spawnSync('pdftoppm', ['-v']).status === 0;
  if (!ok) {
    if (process.env.CI === 'true')
      throw new Error('pdftotext/pdftoppm missing in CI: .ci/run should install poppler-utils');
    console.warn(
      'SKIPPING PDF text checks: pdftotext (poppler-utils) is not installed — apt-get install -y poppler-utils',
    );
  }
  return ok;
}

export function pdfText(file: string): string {
  const r = spawnSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`pdftotext failed: ${r.stderr}`);
  return r.stdout;
}
