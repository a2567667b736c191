import { EXIT, InputError } from "../errors.js";
import { runCli } from "./main.js";

// A reader that stops early (`psdgate psd *.csv --json | head`) closes the pipe: the rest of the output
// is not wanted, so EPIPE ends nothing and prints nothing; the exit code stays that of the work. Any
// other failure to write (a full disk) is reported in one line, not as a stack trace.
process.stdout.on("error", (e: NodeJS.ErrnoException) => {
  if (e.code === "EPIPE" || e.code === "ERR_STREAM_DESTROYED") return;
  const err = new InputError("OUTPUT_UNWRITABLE", { expected: "a writable standard output", received: e.code ?? e.message });
  process.stderr.write(`psdgate: ${err.message}\n`);
  process.exit(EXIT.input);
});

process.exitCode = await runCli(process.argv.slice(2));
