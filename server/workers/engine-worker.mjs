// The file Piscina loads in each engine worker thread. Workers do not inherit a loader registered
// by a test runner (vitest), and the server runs TypeScript through tsx, so this plain-JS
// bootstrap registers tsx in the thread and then loads the TypeScript worker. (Under
// `node --import tsx` the thread already has tsx; registering again is harmless.)
import { register } from 'tsx/esm/api';

register();
const { default: runTask } = await import('./engine-worker.ts');

export default runTask;
