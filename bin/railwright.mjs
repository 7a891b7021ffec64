#!/usr/bin/env node
// Entry for `npx railwright`: loads the TypeScript CLI through tsx's loader.
import { register } from 'tsx/esm/api';

// A reader that goes away early (`railwright summary | head -1`) closes the pipe: further
// output is dropped quietly and the command still finishes its work (e.g. saving a plan),
// instead of dying with an EPIPE stack trace.
const closed = { stdout: false, stderr: false };
for (const name of ['stdout', 'stderr']) {
  process[name].on('error', (e) => {
    if (e && (e.code === 'EPIPE' || e.code === 'ERR_STREAM_DESTROYED')) { closed[name] = true; return; }
    throw e;
  });
}
const write = (name, line) => { if (!closed[name]) process[name].write(line + '\n'); };

register();
const { runCli } = await import('../src-main/cli.ts');
const code = await runCli(process.argv.slice(2), {
  out: (l) => write('stdout', l),
  err: (l) => write('stderr', l),
});
process.exitCode = code;
