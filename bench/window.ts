/** Speed of the drain-window pieces on long logs: `npx tsx bench/window.ts`. Invented data. */
import { chooseDrainWindow, findDrainCandidates, findSpikes } from '../server/core/window/index.js';

function log(n: number) {
  const timeS = new Float64Array(n);
  const levelM = new Float64Array(n);
  const sourceLine = new Int32Array(n);
  const open = Math.floor(n * 0.1);
  const k = Math.sqrt(1.45) / (n * 0.6);
  let seed = 12345;
  const rnd = () => (seed = (seed * 1103515245 + 12345) >>> 0) / 4294967296;
  for (let i = 0; i < n; i++) {
    timeS[i] = i;
    const r = Math.sqrt(1.45) - k * Math.max(0, i - open);
    const h = 0.05 + (r > 0 ? r * r : 0);
    levelM[i] = Math.round((h + 0.0015 * (rnd() + rnd() + rnd() - 1.5) * 2) * 1000) / 1000;
    if (i % 9973 === 0) levelM[i] += 0.05;
    sourceLine[i] = i + 2;
  }
  return { timeS, levelM, sourceLine };
}

function time(label: string, f: () => unknown, reps = 3) {
  f();
  const t0 = performance.now();
  for (let r = 0; r < reps; r++) f();
  console.log(`${label}: ${((performance.now() - t0) / reps).toFixed(1)} ms`);
}

for (const n of [86_400, 1_000_000]) {
  const s = log(n);
  time(`findSpikes n=${n}`, () => findSpikes(s.timeS, s.levelM));
  time(`findDrainCandidates n=${n}`, () => findDrainCandidates(s.timeS, s.levelM, null));
  time(`chooseDrainWindow n=${n}`, () => chooseDrainWindow(s, { outletReadingM: 0.05 }));
}

{
  const s = log(86_400);
  const r = chooseDrainWindow(s, { outletReadingM: 0.05 });
  console.log(
    `86 400-sample log (valve opens at 8640 s): window ${r.window.startS}–${r.window.endS} s, ${r.spikes.length} spikes`,
  );
}
