#!/usr/bin/env node
// Entry point of the `shadowfront` command. The sources are TypeScript; tsx compiles them on the fly.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2));
