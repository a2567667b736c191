/** What a command writes to and reads from: the process's streams, or a test's strings. */
export interface CliIo {
  stdout: (s: string) => void;
  stderr: (s: string) => void;
  /** Whether stderr is a terminal (progress bars are drawn only there). */
  stderrIsTTY?: boolean | undefined;
  readStdin?: (() => Promise<string>) | undefined;
  env?: NodeJS.ProcessEnv | undefined;
}
