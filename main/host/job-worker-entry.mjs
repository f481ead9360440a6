// Development entry of the job worker: registers the TypeScript loader (tsx) inside the worker
// thread, then loads job-worker.ts. A built app ships job-worker.js instead (worker-runner.ts picks it).
import { register } from 'tsx/esm/api';
register();
await import('./job-worker.ts');
