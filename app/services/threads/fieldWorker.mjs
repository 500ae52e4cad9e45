// Entry of a field worker (worker_threads): the sources are TypeScript, so register tsx first, then load
// the worker module. See ./fieldThreads.ts.
import { register } from 'tsx/esm/api';

register();
await import('./fieldWorker.ts');
