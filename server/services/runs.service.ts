/**
 * Runs: what the routes call. Each role lives in its own module: checking a spec against the recipe
 * and codes (run-stages), creating a run or reusing an identical one (run-create), reading runs, their
 * collected files (run-reads), reading logs (run-log), cancelling and resubmitting (run-cancel).
 */

export { cancelRun, resubmitRun } from "./run-cancel.service";
export { createRun, RUN_DIR_PREFIX, type RunDeps, remoteRunDir } from "./run-create.service";
export { listRuns } from "./run-list.service";
export { openRunLogDownload, readRunLog } from "./run-log.service";
export { getRunDetail, readArtifact } from "./run-reads.service";
