/** Thrown by an action to end with an exit code after its output is written (runCli returns the code). */
export class Exit extends Error {
  constructor(readonly code: number) {
    super(`exit ${code}`);
  }
}
