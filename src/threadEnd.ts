import type { MessagePort, Worker } from "node:worker_threads";

/**
 * Ending a worker thread without racing V8. Node 20 unregisters a thread's isolate from the platform
 * before it disposes of it; a TurboFan job still compiling in the background in that window can ask for
 * the gone isolate's task runner and abort the whole process ("Assertion failed: (data.first) != nullptr"
 * in NodePlatform::ForIsolate; seen once in CI, when a queue worker ended right after a job). Compile jobs
 * start only while JavaScript runs, so a thread that has been idle for a moment has none in flight: the
 * thread is asked to leave, waits QUIET_MS with nothing to do, closes its port and ends by itself. A thread
 * that does not end within GIVE_UP_MS (a bug, a job that never returns) is terminated.
 */
export const QUIET_MS = 150;
const GIVE_UP_MS = 10_000;
const LEAVE = "psdgate:leave";

/** In the thread: on the parent's request, end once idle. Call once at the thread's start. */
export function leaveWhenAsked(port: MessagePort, idle: () => Promise<unknown> = () => Promise.resolve()): void {
  port.on("message", (m: unknown) => {
    if (m !== LEAVE) return;
    void idle().finally(() => setTimeout(() => port.close(), QUIET_MS));
  });
}

/** True for the parent's request to leave (a thread's own message handler ignores it). */
export const isLeaveRequest = (m: unknown): boolean => m === LEAVE;

/**
 * In the parent: ends `thread` gracefully and settles when it has exited. With `wait: false` it does not
 * hold the process up: the thread is unref'd and ends on its own.
 */
export function retireThread(thread: Worker, opts: { wait?: boolean } = {}): Promise<void> {
  return new Promise<void>((resolve) => {
    if (thread.threadId < 0) return resolve();
    const timer = setTimeout(() => void thread.terminate(), GIVE_UP_MS);
    thread.once("exit", () => {
      clearTimeout(timer);
      resolve();
    });
    thread.postMessage(LEAVE);
    if (opts.wait === false) {
      timer.unref();
      thread.unref();
      resolve();
    }
  });
}
