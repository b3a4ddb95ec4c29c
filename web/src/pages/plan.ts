/**
 * Plan a drain test (POST /api/vessels/:id/plan): the person states the start level (or a
 * target), the sensor and any discharge limit; the page shows the drain time, the volume, the
 * peak outflow beside the limit, the u of Cd·a and Cd the test should reach, the least test for
 * the target, the cautions, and the predicted level and outflow drawn against time.
 */
import { api, type Vessel } from '../api.js';
import { clear, field, h, notice, select, table } from '../dom.js';
import type { PageContext } from '../main.js';
import { planChart } from '../plan-charts.js';

interface PlannedTest {
  startLevelM: number;
  endLevelM: number;
  durationS: number;
  drainTimeToOutletS: number;
  drainTimeToEndBandS: [number, number];
  windowStartS: number;
  windowEndS: number;
  samplesInWindow: number;
  effectiveSamples: number;
  volumeDischargedM3: number;
  peakOutflowLS: number;
  uncertainty: {
    typeARelative: number;
    effectiveAreaRelative: number;
    dischargeCoefficientRelative: number;
    lines: { name: string; relative: number; kind: string; applies: string }[];
  };
  curve: { timeS: number[]; levelM: number[]; outflowLS: number[] };
}
interface Plan {
  assumptions: {
    expectedCd: number;
    expectedCdSource: string;
    usualCdBand: [number, number];
    maxStartLevelM: number;
    outletLevelM: number;
    varianceInflation: number;
  };
  test: PlannedTest | null;
  target: {
    possible: boolean;
    met: boolean | null;
    reason: string;
    quantity: string;
    relative: number;
  } | null;
  recommendation: {
    shortest: PlannedTest | null;
    lowestStart: PlannedTest | null;
    sampleIntervalNeededS: number | null;
  } | null;
  discharge: { message: string | null; withinLimit: boolean | null };
  cautions: string[];
  notes: string[];
}

const pct = (x: number) => `${Number((x * 100).toPrecision(3))} %`;
const dur = (s: number) => (s < 120 ? `${s.toFixed(0)} s` : `${(s / 60).toFixed(1)} min`);

function testTable(caption: string, t: PlannedTest, band: [number, number]): HTMLElement {
  return table(
    caption,
    ['quantity', 'predicted'],
    [
      [
        'start level → end of logging',
        `${t.startLevelM.toFixed(3)} m → ${t.endLevelM.toFixed(3)} m`,
      ],
      [
        'logging time (valve open to stop)',
        `${dur(t.durationS)} (${dur(t.drainTimeToEndBandS[0])}–${dur(t.drainTimeToEndBandS[1])} for Cd ${band[0]}–${band[1]})`,
      ],
      ['drain time to the outlet', dur(t.drainTimeToOutletS)],
      ['volume discharged', `${t.volumeDischargedM3.toFixed(2)} m³`],
      ['peak outflow at opening', `${t.peakOutflowLS.toFixed(2)} L/s`],
      [
        'fit window',
        `${t.windowStartS.toFixed(0)}–${t.windowEndS.toFixed(0)} s after opening, ${t.samplesInWindow} readings (${t.effectiveSamples.toFixed(0)} effectively independent)`,
      ],
      [
        'u_r(Cd·a)',
        `${pct(t.uncertainty.effectiveAreaRelative)} (fit scatter ${pct(t.uncertainty.typeARelative)})`,
      ],
      ['u_r(Cd)', pct(t.uncertainty.dischargeCoefficientRelative)],
      ...t.uncertainty.lines
        .filter((l) => l.kind === 'B')
        .map((l) => [
          `type B: ${l.name}`,
          `${pct(l.relative)} on ${l.applies === 'effective-area' ? 'Cd·a and Cd' : 'Cd'}`,
        ]),
    ],
    'plan-table',
  );
}

const num = (name: string, value = '', step = 'any') =>
  h('input', { name, type: 'number', step, value, inputmode: 'decimal' });

export async function planPage({ params, main }: PageContext): Promise<void> {
  const id = Number(params[0]);
  const v = await api<Vessel>('GET', `/api/vessels/${id}`);
  main.append(
    h(
      'nav',
      { class: 'crumbs', 'aria-label': 'Where you are' },
      h('a', { href: '#/' }, 'Fleet'),
      ' › ',
      h('a', { href: `#/vessels/${id}` }, v.name),
      ' › plan a test',
    ),
    h('h1', {}, `Plan a drain test: ${v.name}`),
    h(
      'p',
      {},
      'Before anyone climbs the tank: how long the test takes, how much goes to the drain and how fast, and what uncertainty it should reach. Levels are readings above the sensor zero, as the logger shows them.',
    ),
  );
  const outlets = v.outlets.filter((o) => o.retiredAt === null);
  const outlet =
    outlets.length > 1
      ? select(
          'outletId',
          outlets.map((o) => [String(o.id), o.key]),
        )
      : null;
  const f = {
    start: num('startLevelM'),
    end: num('endLevelM'),
    max: num('maxStartLevelM'),
    cd: num('expectedCd'),
    noise: num('noiseMm', '1.5'),
    resolution: num('resolutionMm', '1'),
    interval: num('sampleIntervalS', '1'),
    lag1: num('noiseLag1', '0'),
    target: num('targetPercent'),
    quantity: select(
      'quantity',
      [
        ['effective-area', 'u_r(Cd·a)'],
        ['discharge-coefficient', 'u_r(Cd)'],
      ],
      'effective-area',
    ),
    limit: num('dischargeLimitLS'),
  };
  const go = h('button', { type: 'submit', class: 'primary' }, 'Plan');
  const form = h(
    'form',
    { class: 'card plan-form' },
    h(
      'div',
      { class: 'grid' },
      outlet ? field('Outlet', outlet) : null,
      field('Start level (m)', f.start, 'when the valve opens; leave empty to let a target choose'),
      field('Stop logging at (m)', f.end, 'empty: where the fit’s window ends'),
      field('Highest fill (m)', f.max, 'empty: 95 % of the vessel’s height'),
      field('Expected Cd', f.cd, 'empty: the usual value for the outlet type'),
      field('Sensor noise (mm)', f.noise, 'standard deviation of a reading'),
      field('Resolution (mm)', f.resolution),
      field('Sample interval (s)', f.interval),
      field(
        'Lag-1 correlation of the noise',
        f.lag1,
        '0 for white noise; sloshing makes it higher',
      ),
      field('Target (%)', f.target, 'e.g. 0.2'),
      field('Target is', f.quantity),
      field('Discharge limit (L/s)', f.limit, 'the most the site may release, if stated'),
    ),
    go,
  );
  const out = h('div', { class: 'plan-result', 'aria-live': 'polite' });
  main.append(form, out);
  const val = (i: HTMLInputElement) => (i.value.trim() === '' ? undefined : Number(i.value));
  form.addEventListener('submit', async (e) => {
    e.preventDefault();
    clear(out);
    go.disabled = true;
    try {
      const body: Record<string, unknown> = {
        sensor: {
          noiseM: (val(f.noise) ?? 0) / 1000,
          resolutionM: (val(f.resolution) ?? 0) / 1000,
          sampleIntervalS: val(f.interval),
          noiseLag1: val(f.lag1) ?? 0,
        },
        startLevelM: val(f.start),
        endLevelM: val(f.end),
        maxStartLevelM: val(f.max),
        expectedCd: val(f.cd),
        dischargeLimitLS: val(f.limit),
        outletId: outlet ? Number(outlet.value) : undefined,
      };
      const target = val(f.target);
      if (target !== undefined)
        body.target = { quantity: f.quantity.value, relativeStandardUncertainty: target / 100 };
      const plan = await api<Plan>('POST', `/api/vessels/${id}/plan`, body);
      showPlan(out, plan);
    } catch (err) {
      out.append(notice('error', err instanceof Error ? err.message : String(err)));
    } finally {
      go.disabled = false;
    }
  });
}

function showPlan(out: HTMLElement, p: Plan): void {
  const a = p.assumptions;
  out.append(
    h(
      'p',
      { class: 'muted' },
      `Assumed Cd ${a.expectedCd} (${a.expectedCdSource}); usual band ${a.usualCdBand[0]}–${a.usualCdBand[1]}; highest fill ${a.maxStartLevelM.toFixed(3)} m; noise variance factor ${a.varianceInflation.toPrecision(3)} for correlation.`,
    ),
  );
  if (p.discharge.message)
    out.append(
      notice(
        p.discharge.withinLimit ? 'info' : 'caution',
        h('strong', {}, 'Discharge. '),
        p.discharge.message,
      ),
    );
  if (p.test) out.append(testTable('The planned test', p.test, a.usualCdBand));
  if (p.target) {
    const label = p.target.quantity === 'effective-area' ? 'u_r(Cd·a)' : 'u_r(Cd)';
    const verdict = !p.target.possible
      ? 'cannot be met'
      : p.target.met === null
        ? 'can be met'
        : p.target.met
          ? 'is met by the planned test'
          : 'is not met by the planned test';
    out.append(
      notice(
        p.target.possible ? 'info' : 'caution',
        h(
          'strong',
          { class: 'target-verdict' },
          `Target ${label} ${pct(p.target.relative)} ${verdict}. `,
        ),
        p.target.reason,
      ),
    );
    const r = p.recommendation;
    if (r?.shortest)
      out.append(testTable('Shortest test that meets the target', r.shortest, a.usualCdBand));
    if (r?.lowestStart)
      out.append(
        testTable(
          'Lowest start level that meets it (logged to the window’s end)',
          r.lowestStart,
          a.usualCdBand,
        ),
      );
  }
  const drawn = p.test ?? p.recommendation?.shortest ?? null;
  if (drawn) {
    const holder = h('div', {
      class: 'chart plan-chart',
      role: 'img',
      'aria-label': 'Predicted level and outflow against time',
    });
    out.append(
      h(
        'h2',
        {},
        p.test ? 'Predicted level and outflow' : 'Predicted level and outflow (shortest test)',
      ),
      holder,
    );
    planChart(holder, drawn.curve);
  }
  out.append(
    h('h2', {}, 'Before you start'),
    h(
      'ul',
      { class: 'cautions' },
      p.cautions.map((c) => h('li', {}, c)),
    ),
  );
  if (p.notes.length)
    out.append(
      h(
        'ul',
        { class: 'muted' },
        p.notes.map((n) => h('li', {}, n)),
      ),
    );
}
