/**
 * Child process for crash.test.ts: waits for a line "go" on stdin (so that it can load while the
 * previous writer runs), opens the logbook for writing and commits measurements one by one as fast as
 * it can, printing "committed <count>" after each commit returns, until it is killed.
 * Usage: node --import tsx crash-writer.ts <db>
 */
import { openLogbook } from '../../app/services/logbook/logbook.ts';
import { syntheticResult } from './helpers.ts';

const db = process.argv[2];
await new Promise<void>((resolve) => {
  let seen = '';
  process.stdin.on('data', (d: Buffer) => {
    seen += d.toString();
    if (seen.includes('go')) resolve();
  });
});
const lb = await openLogbook(db, { write: true, command: 'crash test writer' });
let count = lb.listMeasurements().length;
const result = syntheticResult({ terms: { 3: 0.01, 4: 0.02, 5: -0.01, 7: 0.004, 8: 0.001 } });
function commit(): void {
  const n = count + 1;
  // Every commit writes a measurement, its tags, its result and a frame of its own: all or nothing.
  const frame = new TextEncoder().encode(`frame of measurement ${n} from pid ${process.pid}`);
  lb.addMeasurement({ asset: 'crash', notes: `n=${n}`, tags: ['crash', `n${n % 7}`], result, frames: [{ bytes: frame, name: `f${n}.npy` }] });
  count = n;
}
// One commit to warm up (the first one is slow while the code is compiled), then the kill window opens.
commit();
process.stdout.write(`ready ${count}\n`);
for (;;) {
  commit();
  process.stdout.write(`committed ${count}\n`);
}
