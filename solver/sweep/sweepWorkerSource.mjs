// The sweep pool's worker thread when Placode runs from its TypeScript sources
// (tests, a development checkout): registers the TypeScript loader, then runs
// the worker. Compiled installs start dist/solver/sweep/sweepWorker.js directly.
import { register } from 'tsx/esm/api';

register();
await import('./sweepWorker.ts');
