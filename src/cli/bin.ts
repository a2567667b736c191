import { startEarly } from "../read/csvWorkerStart.js";

// A large CSV named on the command line is parsed on a worker thread: start it now, so that its start-up
// overlaps the loading of the program's own modules (imported below, after it; about 60 ms each).
startEarly(process.argv.slice(2));
const { EXIT, InputError } = await import("../errors.js");
const { removeTemporaryFilesSync } = await import("../report/writeAtomic.js");
const { runCli } = await import("./main.js");

// A reader that stops early (`psdgate psd *.csv --json | head`) closes the pipe: the rest of the output
// is not wanted, so EPIPE ends nothing and prints nothing; the exit code stays that of the work. Any
// other failure to write (a full disk) is reported in one line, not as a stack trace.
process.stdout.on("error", (e: NodeJS.ErrnoException) => {
  if (e.code === "EPIPE" || e.code === "ERR_STREAM_DESTROYED") return;
  const err = new InputError("OUTPUT_UNWRITABLE", {
    expected: "a writable standard output",
    received: e.code ?? e.message,
  });
  process.stderr.write(`psdgate: ${err.message}\n`);
  removeTemporaryFilesSync();
  process.exit(EXIT.input);
});

// Interrupted (Ctrl-C, a job engine's SIGTERM, a closed terminal): remove every temporary output
// file still being written, then exit 128 + the signal number, as a shell reports it (common practice).
for (const [signal, code] of [
  ["SIGINT", 130],
  ["SIGTERM", 143],
  ["SIGHUP", 129],
] as const) {
  process.on(signal, () => {
    // A command that listens for the signal itself (`queue work`: finish the jobs in hand) handles it.
    if (process.listenerCount(signal) > 1) return;
    removeTemporaryFilesSync();
    process.exit(code);
  });
}
process.on("exit", removeTemporaryFilesSync);

// A rejection no psdgate code awaits. The one seen: node-postgres asks whether `Response` exists (its
// Cloudflare check), which makes Node load its bundled HTTP client, whose parser compiles WebAssembly in a
// promise nobody awaits; under a memory cap (ulimit -v) that compile fails after the command's own line was
// printed, and Node printed a raw stack. psdgate never makes an HTTP request, so that one is dropped; any
// other is a bug, said in one line with exit 70.
process.on("unhandledRejection", (reason: unknown) => {
  const e = reason instanceof Error ? reason : new Error(String(reason));
  if (e instanceof RangeError && /WebAssembly/.test(e.message) && /undici/.test(e.stack ?? "")) return;
  process.stderr.write(`psdgate: internal error (a bug; please report it): ${e.message} [INTERNAL]\n`);
  removeTemporaryFilesSync();
  process.exit(EXIT.internal);
});

process.exitCode = await runCli(process.argv.slice(2));
