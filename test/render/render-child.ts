/** Renders a fit report from its JSON in a fresh process and prints the PDF's SHA-256 (determinism test). */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { renderFitReportPdf } from '../../server/render/fit-report-pdf.js';

const report = JSON.parse(readFileSync(process.argv[2], 'utf8'));
const pdf = await renderFitReportPdf(report);
process.stdout.write(createHash('sha256').update(pdf).digest('hex') + '\n');
