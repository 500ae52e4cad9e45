// Entry of the job worker (worker_threads): the sources are TypeScript, so register tsx first, then load
// the worker module. See app/services/app/jobs.ts.
import { register } from 'tsx/esm/api';

register();
await import('./jobWorker.ts');
