// What other packages may use of the CLI: its exit codes and how it decides them, so a test
// can check that the CLI gates on the same build status the server stores.
export { EXIT, type ExitCode } from './cli-error.js';
export { exitCodeFor, exitCodeForStatus, submittedStatus } from './submit/submit-outcome.js';
// The line `earmark submit` prints for a failed check, so a test can hold it to the server's wording.
export { describeFailedCheck } from './submit/format-summary.js';
