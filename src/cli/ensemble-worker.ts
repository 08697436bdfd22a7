/**
 * A worker thread of `lakeledger ensemble`: runs one slice of the members (all scenarios)
 * and sends the outcomes back over its port. After every message it bumps a shared counter
 * and notifies, because the command's thread waits synchronously (Atomics.wait) and reads
 * the port with receiveMessageOnPort.
 */
import { workerData, type MessagePort } from 'node:worker_threads';
import { runMembers } from '../lib/engine/uncertainty/ensemble';
import type { MemberDraw } from '../lib/engine/uncertainty/lhs';
import type { ModelDoc, ScenarioDoc } from '../lib/engine/index';

interface Data {
  model: ModelDoc;
  scenarios: ScenarioDoc[];
  draws: MemberDraw[];
  offset: number;
  port: MessagePort;
  flag: SharedArrayBuffer;
  /** Set to 1 by the command to cancel. */
  cancel: SharedArrayBuffer;
}

const data = workerData as Data;
const flag = new Int32Array(data.flag);
const cancel = new Int32Array(data.cancel);
const send = (msg: unknown) => {
  data.port.postMessage(msg);
  Atomics.add(flag, 0, 1);
  Atomics.notify(flag, 0);
};

send({ type: 'ready' });
try {
  const signal = {
    get aborted() {
      return Atomics.load(cancel, 0) !== 0;
    }
  };
  const result = runMembers(data.model, data.scenarios, data.draws, {
    offset: data.offset,
    signal,
    onProgress: ({ done }) => send({ type: 'progress', done })
  });
  send({ type: 'done', result });
} catch (e) {
  send({ type: 'error', message: (e as Error)?.message ?? String(e) });
}
data.port.close();
