// What a render worker does with each message; pure enough to test without threads.

import { InputError } from '../errors.js';
import type { ResolvedShot } from '../shot/types.js';
import { runFrameJob } from './frame-job.js';
import { adoptShotAssets } from './render-frame.js';
import type { FromWorker, ToWorker, WorkerFault } from './worker-protocol.js';

export function createWorkerHandler(fault?: WorkerFault, crash: () => never = () => process.exit(70)) {
  let shot: ResolvedShot | undefined;
  return (msg: ToWorker): FromWorker => {
    if (msg.type === 'init') {
      shot = msg.shot;
      adoptShotAssets(shot, msg.assets);
      return { type: 'ready' };
    }
    const { job, attempt } = msg;
    try {
      if (!shot) throw new Error('worker used before init');
      if (fault && fault.frame === job.frame && (fault.times === 'always' || attempt === 0)) {
        if (fault.kind === 'crash') crash();
        throw new Error(`injected fault on frame ${job.frame}`);
      }
      return { type: 'done', result: runFrameJob(shot, job) };
    } catch (e) {
      // bad input (a matte frame that will not decode) is said as such, and not retried
      return { type: 'failed', job, attempt, error: (e as Error).message, badInput: e instanceof InputError };
    }
  };
}
