/**
 * The bench's web worker: runs `analyze()` off the main thread so slider drags stay smooth. One
 * job at a time; the main thread (`runner.ts`) keeps only the latest pending job of each kind,
 * so the newest settings always win.
 */
/// <reference lib="webworker" />
import { runJob, type JobMessage } from './jobs';

const scope = self as unknown as DedicatedWorkerGlobalScope;
scope.onmessage = (event: MessageEvent<JobMessage>) => {
	scope.postMessage(runJob(event.data));
};
