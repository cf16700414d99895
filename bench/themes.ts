/**
 * `npm run bench:themes`: how long theme suggestions take for a wall of notes (default 1,000;
 * `--notes N`), the figure the facilitator waits for in the console. Notes are invented from the demo
 * scenario (Harbour Lane Bike Co-op): a dozen topics of a few words each, words every note uses
 * ("bike", "ride"), filler, and some notes in Japanese, Chinese and Thai. Prints the median and the
 * slowest of the timed runs after warm-up runs, wall and CPU time.
 */
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { suggestThemes, type ThemeNote } from '../shared/themes';
import { mulberry32 } from '../tests/shared/random';

const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1]! : fallback;
};
const NOTES = Number(arg('notes', '1000'));
const RUNS = Number(arg('runs', '7'));
const WARMUP = 2;

const topics = [
  ['unlock', 'app', 'bluetooth', 'code', 'tries'],
  ['helmet', 'size', 'strap', 'missing', 'clean'],
  ['saddle', 'height', 'lever', 'stiff', 'knees'],
  ['dock', 'station', 'full', 'harbour', 'locked'],
  ['map', 'route', 'lanes', 'hill', 'sunlight'],
  ['brakes', 'squeak', 'wet', 'stopping', 'lever'],
  ['membership', 'price', 'card', 'signup', 'form'],
  ['gears', 'chain', 'slipped', 'shifting', 'smooth'],
  ['lights', 'dark', 'battery', 'front', 'evening'],
  ['basket', 'shopping', 'bag', 'carry', 'small'],
  ['volunteer', 'welcome', 'explained', 'friendly', 'staff'],
  ['tyres', 'pressure', 'soft', 'pump', 'flat'],
];
const common = ['bike', 'ride', 'first', 'time', 'felt', 'new', 'member'];
const filler = ['quite', 'bit', 'again', 'today', 'maybe', 'thought', 'easy', 'hard', 'long', 'late'];
const spaceless = [
  'ヘルメットが大きすぎる',
  'ヘルメットをどこに置けばいいかわからない',
  '駐輪場が満車だった',
  '头盔太大了',
  '没有头盔',
  '停车桩满了',
  'หมวกกันน็อคใหญ่เกินไป',
  'ไม่มีหมวกกันน็อคที่จุดจอด',
];

const random = mulberry32(1000);
const pick = <T>(list: T[]): T => list[Math.floor(random() * list.length)]!;
const notes: ThemeNote[] = Array.from({ length: NOTES }, (_, i) => {
  if (random() < 0.05) return { id: `n${i}`, text: pick(spaceless) };
  const topic = pick(topics);
  const words = [pick(topic), pick(topic), pick(common)];
  for (let w = 0; w < 2 + Math.floor(random() * 5); w++) words.push(random() < 0.5 ? pick(filler) : pick(pick(topics)));
  return { id: `n${i}`, text: words.join(' ') };
});

// Wall time is what the facilitator waits; CPU time (user + system of this one-threaded run) is shown
// beside it, as on a busy machine the wall time also counts the waits for a core.
const wall: number[] = [];
const cpu: number[] = [];
let themes = 0;
for (let run = 0; run < WARMUP + RUNS; run++) {
  const start = performance.now();
  const used = process.cpuUsage();
  themes = suggestThemes(notes).length;
  const spent = process.cpuUsage(used);
  const ms = performance.now() - start;
  if (run >= WARMUP) {
    wall.push(ms);
    cpu.push((spent.user + spent.system) / 1000);
  }
}
const median = (list: number[]) => [...list].sort((a, b) => a - b)[Math.floor(list.length / 2)]!;
console.log(
  `Theme suggestions for ${NOTES} notes: median ${median(wall).toFixed(1)} ms wall (slowest ${Math.max(...wall).toFixed(1)} ms), ` +
    `median ${median(cpu).toFixed(1)} ms CPU (least ${Math.min(...cpu).toFixed(1)} ms), over ${RUNS} runs after ${WARMUP} warm-up ` +
    `(${themes} themes; Node ${process.versions.node}; load average ${os.loadavg()[0]!.toFixed(1)} on ${os.cpus().length} cores).`,
);
