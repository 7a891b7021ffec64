#!/usr/bin/env node
// Entry for `npx railwright`: loads the TypeScript CLI through tsx's loader.
import { register } from 'tsx/esm/api';

register();
const { runCli } = await import('../src-main/cli.ts');
const code = await runCli(process.argv.slice(2), {
  out: (l) => process.stdout.write(l + '\n'),
  err: (l) => process.stderr.write(l + '\n'),
});
process.exitCode = code;
