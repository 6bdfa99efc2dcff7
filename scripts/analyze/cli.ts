// Shared by the analyze commands (scripts/analyze/<kind>.ts): flags into a typed object, the exit codes
// (0 done, 1 the analysis failed, 2 a command-line mistake, printed with the usage), progress on stderr,
// and the summary, timings and artifacts written into the output folder.
import { copyFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs, type ParseArgsConfig } from "node:util";

type Options = NonNullable<ParseArgsConfig["options"]>;
type Config<O extends Options> = { args: string[]; allowPositionals: true; options: O };
/** The parsed flags, typed from the option table (strings, booleans, defaults). */
export type Flags<O extends Options> = ReturnType<typeof parseArgs<Config<O>>>["values"];

/** A command-line mistake found after parsing: printed with the usage, exit code 2. */
export class UsageError extends Error {}

export interface Command<O extends Options> {
  /** the kind, which prefixes failure messages: `drainage: …` */
  name: string;
  usage: string;
  options: O;
  /** Runs the analysis on the one positional input; throws UsageError for a mistake in the flags. */
  run(input: string, flags: Flags<O>): Promise<void>;
  /** The message of a failure the command expects (exit 1), or undefined to let the error escape; default: any Error's message. */
  failure?: (err: unknown) => string | undefined;
}

/** Parses argv for `command`, runs it and answers with the exit code. A `--help` flag, where declared, prints the usage. */
export async function runCommand<O extends Options>(argv: string[], command: Command<O>): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, allowPositionals: true, options: command.options });
  } catch (err) {
    console.error(`${(err as Error).message}\n${command.usage}`);
    return 2;
  }
  const { values, positionals } = parsed;
  if ((values as Record<string, unknown>).help === true) { console.log(command.usage); return 0; }
  if (positionals.length !== 1) { console.error(command.usage); return 2; }
  try {
    await command.run(positionals[0], values);
    return 0;
  } catch (err) {
    if (err instanceof UsageError) { console.error(`${err.message}\n${command.usage}`); return 2; }
    const message = command.failure ? command.failure(err) : (err as Error).message;
    if (message === undefined) throw err;
    console.error(`${command.name}: ${message}`);
    return 1;
  }
}

/** Stage and percentage on stderr, one line each, unless quiet. */
export const progressOnStderr = (quiet: boolean) => (quiet
  ? undefined
  : (stage: string, fraction: number) => { process.stderr.write(`${(fraction * 100).toFixed(0).padStart(3)}% ${stage}\n`); });

/** `name` in `dir` as indented JSON with a final newline. */
export async function writeJson(dir: string, name: string, value: unknown): Promise<void> {
  await writeFile(path.join(dir, name), JSON.stringify(value, null, 2) + "\n");
}

/** The pipeline's artifacts into the existing `dir`: bytes are written, files copied unless the pipeline already wrote them there. */
export async function writeArtifacts(dir: string, artifacts: readonly { name: string; bytes?: Uint8Array; path?: string }[]): Promise<void> {
  for (const a of artifacts) {
    const target = path.join(dir, a.name);
    if (a.bytes) await writeFile(target, a.bytes);
    else if (a.path && path.resolve(a.path) !== target) await copyFile(a.path, target);
  }
}

/** The fractal dimension estimates as the line and surface commands print them: D and interval to 3 places. */
export function dimensionDigest(dimensions: readonly { estimator: string; D: number; ci95: readonly number[]; rSquared: number; rangeMinM: number; rangeMaxM: number }[]) {
  return dimensions.map((d) => ({
    estimator: d.estimator, D: Number(d.D.toFixed(3)), ci95: d.ci95.map((v) => Number(v.toFixed(3))),
    rSquared: Number(d.rSquared.toFixed(4)), rangeM: [d.rangeMinM, d.rangeMaxM].map((v) => Number(v.toFixed(1))),
  }));
}
