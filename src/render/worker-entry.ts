// Render worker thread: wires the message port to the handler.
//
// Replies are copied, not transferred: the first ArrayBuffer a thread detaches (by transferring
// it) invalidates a V8-wide assumption that no buffer is ever detached, and every optimised
// function that touches a typed array is thrown away and compiled again, in each worker, right
// after its first frame. The screening cells are about 0.75 MB a 1080p frame; copying them costs
// less than a millisecond.
import { parentPort, workerData } from 'node:worker_threads';
import { prepareThread } from './frame-job.js';
import { createWorkerHandler } from './worker-handler.js';

const handle = createWorkerHandler(workerData?.fault);
// the frame and the encoder's buffers are allocated and faulted in while the main thread prepares
// the lens
if (workerData?.frame) prepareThread(workerData.frame.widthPx, workerData.frame.heightPx, workerData.frame.output);
parentPort!.on('message', (msg) => {
  parentPort!.postMessage(handle(msg));
});
