/**
 * The `shadowfront` command: a thin shell over the shared services in app/services and core/.
 */
import { readFileSync } from 'node:fs';
import { reportError, UsageError } from './output.ts';
import { simulateCommand, SIMULATE_USAGE } from './commands/simulate.ts';
import { figuresCommand, FIGURES_USAGE } from './commands/figures.ts';
import { demoCommand, DEMO_USAGE } from './commands/demo.ts';

const COMMANDS: Record<string, { run: (argv: string[]) => number | Promise<number>; usage: string; summary: string }> = {
  simulate: { run: simulateCommand, usage: SIMULATE_USAGE, summary: 'simulate a camera frame of the shadow from a scene file' },
  figures: { run: figuresCommand, usage: FIGURES_USAGE, summary: 'print the derived figures of a bench setup' },
  demo: { run: demoCommand, usage: DEMO_USAGE, summary: 'run the bundled synthetic demonstration' },
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
      process.stdout.write(`${COMMANDS[rest[0]].usage}\n`);
      return 0;
    }
    process.stdout.write(`${MAIN_USAGE}\n`);
    return cmd ? 0 : 2;
  }
  if (cmd === '--version' || cmd === '-v') {
    process.stdout.write(`${version()}\n`);
    return 0;
  }
  const command = COMMANDS[cmd];
  if (!command) {
    return reportError(new UsageError(`unknown command "${cmd}"`), MAIN_USAGE);
  }
  try {
    return await command.run(rest);
  } catch (err) {
    // node:util parseArgs throws TypeError with a code for unknown or malformed options.
    const code = (err as { code?: string }).code;
    if (code && code.startsWith('ERR_PARSE_ARGS')) return reportError(new UsageError((err as Error).message), command.usage);
    return reportError(err, command.usage);
  }
}
