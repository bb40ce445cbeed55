#!/usr/bin/env node
import { Command, CommanderError, InvalidArgumentError } from "commander";
import { KEEL_VERSION } from "../version.js";
import { buildSpecJsonSchema } from "../spec/schema.js";
import { messages } from "../diagnostics/messages.js";
import { CliExit, EXIT } from "./io.js";
import { runCheck } from "./commands/check.js";
import { runAnalyze } from "./commands/analyze.js";
import { availableParallelism } from "node:os";

function parseJobs(value: string): number {
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError("expected a whole number of at least 1");
  return n;
}

function buildProgram(): Command {
  const program = new Command("keel")
    .description("Turn one JSON spec of a planar ODE model into a stability dossier.")
    .version(KEEL_VERSION, "-V, --version", "print keel's version")
    .option("-q, --quiet", "no progress output on stderr")
    .option("-j, --jobs <n>", `worker threads for heavy passes (default: available cores, here ${availableParallelism()})`, parseJobs)
    .exitOverride()
    .showHelpAfterError(false);

  program
    .command("check")
    .description("validate a spec and print a model summary")
    .argument("<spec>", "path to the spec JSON file")
    .action((spec: string) => {
      process.stdout.write(runCheck(spec) + "\n");
    });

  program
    .command("analyze")
    .description("run every analysis and write DIR/results.json")
    .argument("<spec>", "path to the spec JSON file")
    .option("-o, --out <dir>", "output folder (default: out/<id>/)")
    .action((spec: string, opts: { out?: string }) => {
      const path = runAnalyze(spec, { out: opts.out, quiet: Boolean(program.opts().quiet) });
      if (!Boolean(program.opts().quiet)) process.stderr.write(`wrote ${path}\n`);
    });

  program
    .command("schema")
    .description("print the JSON Schema of the spec format")
    .action(() => {
      process.stdout.write(JSON.stringify(buildSpecJsonSchema(), null, 2) + "\n");
    });

  for (const cmd of program.commands) cmd.exitOverride();
  return program;
}

export async function main(argv: string[]): Promise<number> {
  const program = buildProgram();
  try {
    await program.parseAsync(argv, { from: "user" });
    return EXIT.ok;
  } catch (err) {
    if (err instanceof CliExit) {
      process.stderr.write(err.message + "\n");
      return err.code;
    }
    if (err instanceof CommanderError) {
      // help and version are successful exits; commander already printed them
      if (err.code === "commander.helpDisplayed" || err.code === "commander.version" || err.code === "commander.help") return EXIT.ok;
      return EXIT.input;
    }
    process.stderr.write(messages.internal((err as Error)?.message ?? String(err)) + "\n");
    if (process.env.KEEL_DEBUG) process.stderr.write(String((err as Error)?.stack) + "\n");
    return EXIT.internal;
  }
}

main(process.argv.slice(2)).then((code) => {
  process.exitCode = code;
});
