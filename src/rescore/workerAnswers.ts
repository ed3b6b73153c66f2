/**
 * Synchronous answers from a worker thread, for the stages that are synchronous (the detectors,
 * re-scoring): the worker posts each answer on a MessagePort and counts it in a small shared
 * state; this side waits on the count (Atomics.wait) and then takes the message
 * (receiveMessageOnPort), so no event loop turn is needed. The worker also beats a heartbeat
 * while it works; an answer that does not come while the heartbeat stands still for
 * `stallSeconds` (the worker died, ran out of memory, was killed) counts as a failure.
 *
 * Used by indexThread.ts (the nearest-concept index) and lexicalThread.ts (lexical features of
 * re-scoring); both do the work on the calling thread when an answer fails.
 */
import { MessageChannel, Worker, receiveMessageOnPort, type MessagePort, type TransferListItem } from 'node:worker_threads';

/** Slots of the shared state: [POSTED] answers the worker has posted, [HEARTBEAT] its heartbeat. */
const POSTED = 0;
const HEARTBEAT = 1;

/** A new shared state, to hand to the worker with its port. */
export function answerState(): Int32Array {
  return new Int32Array(new SharedArrayBuffer(8));
}

/** The worker's side: beat while working; answer in the order asked. */
export function answerer(state: Int32Array, port: MessagePort) {
  return {
    beat: () => Atomics.add(state, HEARTBEAT, 1),
    answer: (message: unknown, transfer: ArrayBuffer[] = []) => {
      port.postMessage(message, transfer);
      Atomics.add(state, POSTED, 1);
      Atomics.notify(state, POSTED);
    },
  };
}

/** The calling side: the worker's answers in order, waited for. */
export class WorkerAnswers<T extends object> {
  private read = 0;
  private open = true;

  constructor(
    private readonly state: Int32Array,
    private readonly port: MessagePort,
    private readonly stallSeconds: number,
    private readonly onStop: () => void,
  ) {}

  get alive(): boolean {
    return this.open;
  }

  /** Answers the worker has posted so far (read or not). */
  posted(): number {
    return Atomics.load(this.state, POSTED);
  }

  /** The next answer; undefined once the worker failed (an `error` answer) or stalled, after which it is stopped. */
  next(): T | undefined {
    if (!this.open) return undefined;
    let beat = Atomics.load(this.state, HEARTBEAT);
    let quiet = 0;
    while (Atomics.load(this.state, POSTED) === this.read && quiet < this.stallSeconds) {
      if (Atomics.wait(this.state, POSTED, this.read, 1000) !== 'timed-out') continue;
      const now = Atomics.load(this.state, HEARTBEAT);
      quiet = now === beat ? quiet + 1 : 0;
      beat = now;
    }
    const answer = Atomics.load(this.state, POSTED) > this.read ? (receiveMessageOnPort(this.port)?.message as T | undefined) : undefined;
    if (answer === undefined || 'error' in answer) {
      this.stop();
      return undefined;
    }
    this.read++;
    return answer;
  }

  /** Close the port and stop the worker (once). */
  stop(): void {
    if (!this.open) return;
    this.open = false;
    this.port.close();
    this.onStop();
  }
}

/**
 * Start the worker `script` with `data` (its `state` and `port` added here) and return its
 * answers and the port to ask it on; undefined when it cannot start. The worker is unref'ed (it
 * does not keep the process alive); its failures are answered on the port or noticed by the
 * heartbeat, and its error event is only kept from going unhandled.
 */
export function startAnswering<T extends object>(script: URL, data: Record<string, unknown>, transfer: TransferListItem[], stallSeconds: number): { answers: WorkerAnswers<T>; port: MessagePort } | undefined {
  const state = answerState();
  const { port1, port2 } = new MessageChannel();
  let worker: Worker;
  try {
    worker = new Worker(script, { workerData: { ...data, state, port: port2 }, transferList: [port2, ...transfer] });
  } catch {
    port1.close();
    return undefined;
  }
  worker.unref();
  worker.on('error', () => {});
  return { answers: new WorkerAnswers<T>(state, port1, stallSeconds, () => void worker.terminate()), port: port1 };
}
