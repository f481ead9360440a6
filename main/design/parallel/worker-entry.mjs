// Development entry of the propensity worker: registers the TypeScript loader (tsx) inside the
// worker thread, then loads worker.ts. A packaged build ships worker.js instead (pool.ts picks it).
import { register } from 'tsx/esm/api';
register();
await import('./worker.ts');
