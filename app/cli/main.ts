/**
 * The `shadowfront` command: a thin shell over the shared services in app/services and core/.
 */
import { readFileSync } from 'node:fs';
import { reportError, UsageError } from './output.ts';

interface CommandModule {
  run(argv: string[]): number | Promise<number>;
  usage: string;
}

// Commands load on demand, so that `--help` does not pay for the physics and unit libraries.
const COMMANDS: Record<string, { load: () => Promise<CommandModule>; summary: string }> = {
  simulate: {
    load: async () => {
      const m = await import('./commands/simulate.ts');
      return { run: m.simulateCommand, usage: m.SIMULATE_USAGE };
    },
    summary: 'simulate a camera frame of the shadow from a scene file',
  },
  fit: {
    load: async () => {
      const m = await import('./commands/fit.ts');
      return { run: m.fitCommand, usage: m.FIT_USAGE };
    },
    summary: 'fit camera frames of the shadow for the beam\'s aberrations',
  },
  figures: {
    load: async () => {
      const m = await import('./commands/figures.ts');
      return { run: m.figuresCommand, usage: m.FIGURES_USAGE };
    },
    summary: 'print the derived figures of a bench setup',
  },
  plan: {
    load: async () => {
      const m = await import('./commands/plan.ts');
      return { run: m.planCommand, usage: m.PLAN_USAGE };
    },
    summary: 'plan the bench: rank candidate discs and camera distances by predicted σ',
  },
  beam: {
    load: async () => {
      const m = await import('./commands/beam.ts');
      return { run: m.beamCommand, usage: m.BEAM_USAGE };
    },
    summary: 'ISO 11146 beam widths from a frame of the beam itself',
  },
  demo: {
    load: async () => {
      const m = await import('./commands/demo.ts');
      return { run: m.demoCommand, usage: m.DEMO_USAGE };
    },
    summary: 'run the bundled synthetic demonstration',
  },
  log: {
    load: async () => {
      const m = await import('./commands/log.ts');
      return { run: m.logCommand, usage: m.LOG_USAGE };
    },
    summary: 'the beam-health logbook: log, compare, trend, export, report',
  },
  disc: {
    load: async () => {
      const m = await import('./commands/disc.ts');
      return { run: m.discCommand, usage: m.DISC_USAGE };
    },
    summary: "calibrate a disc's shape and keep it in the disc library",
  },
  serve: {
    load: async () => {
      const m = await import('./commands/serve.ts');
      return { run: m.serveCommand, usage: m.SERVE_USAGE };
    },
    summary: 'start the local web mode (the interface in a browser, at 127.0.0.1)',
  },
};

function version(): string {
  const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string };
  return pkg.version;
}

export const MAIN_USAGE = `Usage: shadowfront <command> [options]

Shadowfront measures a laser beam's low-order aberrations from the diffraction shadow of a small
opaque disc (the bright spot and rings that Fresnel diffraction puts behind it).

Commands:
${Object.entries(COMMANDS)
  .map(([name, c]) => `  ${name.padEnd(10)} ${c.summary}`)
  .join('\n')}

Run "shadowfront <command> --help" for the options of a command.
Options: -h, --help   show this help;  --version   print the version`;

export async function main(argv: string[]): Promise<number> {
  const [cmd, ...rest] = argv;
  if (!cmd || cmd === '-h' || cmd === '--help' || cmd === 'help') {
    if (cmd === 'help' && rest[0] && COMMANDS[rest[0]]) {
      process.stdout.write(`${(await COMMANDS[rest[0]].load()).usage}\n`);
      return 0;
    }
    process.stdout.write(`${MAIN_USAGE}\n`);
    return cmd ? 0 : 2;
  }
  if (cmd === '--version' || cmd === '-v') {
    process.stdout.write(`${version()}\n`);
    return 0;
  }
  const entry = COMMANDS[cmd];
  if (!entry) {
    return reportError(new UsageError(`unknown command "${cmd}"`), MAIN_USAGE);
  }
  const command = await entry.load();
  try {
    return await command.run(rest);
  } catch (err) {
    // node:util parseArgs throws TypeError with a code for unknown or malformed options.
    const code = (err as { code?: string }).code;
    if (code && code.startsWith('ERR_PARSE_ARGS')) return reportError(new UsageError((err as Error).message), command.usage);
    return reportError(err, command.usage);
  }
}
