// Child for deep-json.test.ts: hand the planning worker requirements nested 10,000 levels
// deep (an extra field of one load) and report how runPlanInWorker ends. The process must
// then exit on its own: a worker left running would keep it alive.
import { register } from 'tsx/esm/api';

register();
const { runPlanInWorker } = await import('../../src-main/worker/run-plan.ts');
const { demoDocument } = await import('../../src-main/store/demo.ts');
const req = demoDocument().requirements;
let deep = {};
for (let i = 0; i < 10_000; i++) deep = { d: deep };
req.loads[0].deep = deep;
try {
  await runPlanInWorker(req, { budgetMs: 2000 });
  console.log('RESULT planned');
} catch (e) {
  console.log(`RESULT refused: ${e.message}`);
}
// A failure inside the worker (requirements of the wrong shape make the planner throw).
try {
  await runPlanInWorker({ sources: 'not a list' }, { budgetMs: 2000 });
  console.log('RESULT2 planned');
} catch (e) {
  console.log(`RESULT2 refused: ${e.message}`);
}
