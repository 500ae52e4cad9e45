import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { safetyText } from '../../../core/safety.ts';
import { defaultLogbookPath, resolveLogbookPath } from '../../services/logbook/paths.ts';
import { copyDemoLogbook } from '../../services/app/demo.ts';
import { defaultResourcesDir } from '../../services/appService.ts';
import { defaultStaticDir, startWebServer } from '../../web/server.ts';
import { UsageError } from '../output.ts';

export const SERVE_USAGE = `Usage: shadowfront serve [--port <n>] [--logbook <file> | --demo]

Start the local web mode: Shadowfront's interface in a browser on this computer, served at 127.0.0.1
only. Open the address it prints (it carries a fresh access token for this start). Stop with Ctrl-C.

Options:
  --port <n>         port to listen on (default: any free port)
  --logbook <file>   the logbook to use (default: --db, $SHADOWFRONT_DB, or the usual place)
  --db <file>        the same as --logbook
  --demo             use a fresh working copy of the bundled synthetic demo logbook (the bundled
                     files are never changed; the copy is removed when the service stops)
  --static <folder>  the built interface (default: out/renderer; "npm run build" makes it)
  -h, --help         show this help`;

export async function serveCommand(argv: string[]): Promise<number> {
  const { values } = parseArgs({
    args: argv,
    options: {
      port: { type: 'string' },
      logbook: { type: 'string' },
      db: { type: 'string' },
      demo: { type: 'boolean', default: false },
      static: { type: 'string' },
      help: { type: 'boolean', short: 'h', default: false },
    },
  });
  if (values.help) {
    process.stdout.write(`${SERVE_USAGE}\n`);
    return 0;
  }
  let port = 0;
  if (values.port !== undefined) {
    port = Number(values.port);
    if (!Number.isInteger(port) || port < 0 || port > 65535) throw new UsageError(`--port must be a whole number from 0 to 65535, not "${values.port}"`);
  }
  if (values.demo && (values.logbook || values.db)) throw new UsageError('--demo uses the bundled demo logbook; leave out --logbook/--db, or leave out --demo');
  const dataDir = dirname(defaultLogbookPath());
  let demoCopy: string | null = null;
  let logbookPath: string;
  if (values.demo) {
    demoCopy = mkdtempSync(resolve(tmpdir(), 'shadowfront-demo-'));
    logbookPath = copyDemoLogbook(defaultResourcesDir(), demoCopy);
  } else {
    logbookPath = resolveLogbookPath(values.logbook ?? values.db).path;
  }
  const server = await startWebServer({ port, dataDir, logbookPath, demo: !!values.demo, staticDir: values.static ? resolve(values.static) : defaultStaticDir(), service: { prewarm: true } });
  const out = process.stdout;
  out.write(`${safetyText()}\n\n`);
  if (values.demo) out.write(`Logbook: a working copy of the bundled SYNTHETIC demo (made by Shadowfront's own simulator), at ${logbookPath}\n`);
  else out.write(`Logbook: ${logbookPath}\n`);
  out.write(`Shadowfront local web mode is ready (${(performance.now() / 1000).toFixed(1)} s after start). Open this address in a browser on this computer:\n\n  ${server.url}\n\nPress Ctrl-C to stop.\n`);
  return new Promise<number>((done) => {
    let stopping = false;
    const stop = () => {
      if (stopping) return;
      stopping = true;
      out.write('\nStopping Shadowfront…\n');
      void server.close().finally(() => {
        if (demoCopy) rmSync(demoCopy, { recursive: true, force: true });
        process.off('SIGINT', stop);
        process.off('SIGTERM', stop);
        done(0);
      });
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
}
