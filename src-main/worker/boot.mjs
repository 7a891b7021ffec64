// Worker bootstrap: registers the tsx loader in this thread, then loads the TypeScript
// worker named in workerData. (A `--import tsx` in execArgv is not honoured by every Node
// release for worker threads; registering here works under the CLI, vitest and the host.)
import { register } from 'tsx/esm/api';
import { workerData } from 'node:worker_threads';

register();
await import(workerData.entry);
