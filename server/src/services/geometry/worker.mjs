// A geometry worker (see pool.ts): registers tsx so that the TypeScript shapes module loads, then
// answers { id, input, site } with { id, shapes } or { id, error }.
import { parentPort } from 'node:worker_threads';
import { register } from 'tsx/esm/api';

register();
const { shapesOf } = await import('../../../../shared/geometry/shapes.ts');
parentPort.on('message', ({ id, input, site }) => {
  try {
    parentPort.postMessage({ id, shapes: shapesOf(input, site) });
  } catch (e) {
    parentPort.postMessage({ id, error: e instanceof Error ? e.message : String(e) });
  }
});
parentPort.postMessage({ ready: true });
