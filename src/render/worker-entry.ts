// Render worker thread: wires the message port to the handler.
import { parentPort, workerData } from 'node:worker_threads';
import { createWorkerHandler } from './worker-handler.js';

const handle = createWorkerHandler(workerData?.fault);
parentPort!.on('message', (msg) => {
  const reply = handle(msg);
  const transfer = reply.type === 'done' ? [reply.result.cells.lum.buffer, reply.result.cells.u.buffer, reply.result.cells.v.buffer, reply.result.cells.red.buffer] : [];
  parentPort!.postMessage(reply, transfer as ArrayBuffer[]);
});
