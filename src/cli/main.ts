import { Command, CommanderError, InvalidArgumentError, Option } from "commander";
import { KEEL_VERSION } from "../version.js";
import { buildSpecJsonSchema } from "../spec/schema.js";
import { messages } from "../diagnostics/messages.js";
import { CliExit, EXIT, inputError, readSpecFile, type CommonOptions } from "./io.js";
import { StageClock } from "./profile.js";
import { DEFAULT_TIME_LIMIT_SECONDS } from "./supervisor.js";
import { parseSpecText } from "../spec/parse.js";
import { availableParallelism } from "node:os";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

function parseTimeLimit(value: string): number {
  const seconds = Number(value);
  if (value.trim() === "" || !Number.isFinite(seconds) || seconds < 0)
    throw new InvalidArgumentError(messages.timeLimitInvalid());
  return seconds;
}

function parseJobs(value: string): number {
  const n = Number(value);
  if (!Number.isInteger(n) || n < 1) throw new InvalidArgumentError("expected a whole number of at least 1");
  return n;
}

/**
 * Spec-level faults are found before the expression compiler and the analysis are loaded (their
 * modules take most of a second to import), so a bad spec is reported at once.
 */
function prevalidate(file: string): void {
  const parsed = parseSpecText(readSpecFile(file));
  if (!parsed.ok) throw inputError(parsed.issues, file);
}

/** --profile's clock, one per run of the program. */
const clocks = new WeakMap<Command, StageClock>();

function clockOf(program: Command): StageClock | undefined {
  if (!program.opts().profile) return undefined;
  if (!clocks.has(program)) clocks.set(program, new StageClock());
  return clocks.get(program);
}

/** The program-level options every command passes on. */
function commonOptions(program: Command): CommonOptions {
  const limit = (program.opts().timeLimit as number | undefined) ?? DEFAULT_TIME_LIMIT_SECONDS;
  return {
    quiet: Boolean(program.opts().quiet),
    jobs: program.opts().jobs,
    timeLimit: limit === 0 ? null : limit,
    clock: clockOf(program),
  };
}

function addCheckCommand(program: Command): void {
  program
    .command("check")
    .description("validate a spec and print a model summary")
    .argument("<spec>", "path to the spec JSON file")
    .option("--claims", "also run the analysis and check the spec's claims; exit 3 when any is contradicted")
    .action(async (spec: string, opts: { claims?: boolean }) => {
      prevalidate(spec);
      const { runCheck, runCheckClaims } = await import("./commands/check.js");
      if (!opts.claims) {
        process.stdout.write(runCheck(spec) + "\n");
        return;
      }
      const { text, code } = await runCheckClaims(spec, commonOptions(program));
      process.stdout.write(text + "\n");
      if (code !== EXIT.ok) throw new CliExit(code, "");
    });
}

function addAnalyzeCommand(program: Command): void {
  program
    .command("analyze")
    .description("run every analysis and write DIR/results.json")
    .argument("<spec>", "path to the spec JSON file")
    .option("-o, --out <dir>", "output folder (default: out/<id>/)")
    .action(async (spec: string, opts: { out?: string }) => {
      prevalidate(spec);
      const { runAnalyze } = await import("./commands/analyze.js");
      const path = await runAnalyze(spec, { out: opts.out, ...commonOptions(program) });
      if (!commonOptions(program).quiet) process.stderr.write(`wrote ${path}\n`);
    });
}

function addBuildCommand(program: Command): void {
  program
    .command("build")
    .description("write results.json, figures/, dossier.html and dossier.pdf into DIR")
    .argument("<spec>", "path to the spec JSON file")
    .option("-o, --out <dir>", "output folder (default: out/<id>/)")
    .option("--paper <size>", "paper size: a4 or letter", "a4")
    .option("--pdf", "require the PDF: a missing Chromium is an error")
    .option("--no-pdf", "skip the PDF")
    .option("--force", "write into an --out folder that holds other files, replacing keel's own one by one")
    .action(async (spec: string, opts: { out?: string; paper: string; pdf?: boolean; force?: boolean }) => {
      if (opts.paper !== "a4" && opts.paper !== "letter")
        throw new CliExit(EXIT.input, `error: --paper must be a4 or letter, got '${opts.paper}'`);
      // with both --pdf and --no-pdf declared, commander leaves the value undefined unless one is given
      const explicitPdf = opts.pdf;
      prevalidate(spec);
      // loaded on demand: the renderer's dependencies are not needed by check and analyze
      const { runBuild } = await import("./commands/build.js");
      const { written, pdfFailure } = await runBuild(spec, {
        out: opts.out,
        paper: opts.paper,
        pdf: explicitPdf,
        force: opts.force,
        ...commonOptions(program),
      });
      const dossiers = written.filter((w) => /dossier\.(html|pdf)$/.test(w)).join(" and ");
      if (!commonOptions(program).quiet)
        process.stderr.write(`wrote ${written.length} files, including ${dossiers}\n`);
      // always said, even with --quiet: the exit code alone would not say what is missing
      if (pdfFailure) throw new CliExit(EXIT.noPdf, `error: ${messages.pdfNotPrinted(pdfFailure)}`);
    });
}

function addVerifyCommand(program: Command): void {
  program
    .command("verify")
    .description("check an archived dossier's hashes and re-run its analysis; exit 3 when anything differs")
    .argument("<target>", "a folder written by keel build, or a dossier.pdf")
    .action(async (target: string) => {
      const { runVerify } = await import("./commands/verify.js");
      const report = await runVerify(target, commonOptions(program));
      process.stdout.write(report.lines.join("\n") + "\n");
      if (!report.ok) throw new CliExit(EXIT.contradicted, "");
    });
}

/** The committed results schema, shipped in the package's schema/ folder (package.json "files"). */
const RESULTS_SCHEMA_URL = new URL("../../schema/keel-results.schema.json", import.meta.url);

function readResultsSchema(): string {
  try {
    return readFileSync(RESULTS_SCHEMA_URL, "utf8");
  } catch (err) {
    // a broken installation, not bad input
    const reason = (err as Error).message;
    throw new CliExit(
      EXIT.internal,
      `error: ${messages.resultsSchemaMissing(fileURLToPath(RESULTS_SCHEMA_URL), reason)}`,
    );
  }
}

function addSchemaCommand(program: Command): void {
  program
    .command("schema")
    .description("print the JSON Schema of specs, or of results.json")
    .option("--results", "print the JSON Schema of results.json instead")
    .action((opts: { results?: boolean }) => {
      if (opts.results) process.stdout.write(readResultsSchema());
      else process.stdout.write(JSON.stringify(buildSpecJsonSchema(), null, 2) + "\n");
    });
}

function buildProgram(): Command {
  const program = new Command("keel")
    .description("Turn one JSON spec of a planar ODE model into a stability dossier.")
    .version(KEEL_VERSION, "-V, --version", "print keel's version")
    .option("-q, --quiet", "no progress output on stderr")
    .option(
      "--profile",
      "print the wall time of every stage on stderr at the end (analyze, build, check --claims, verify)",
    )
    .addOption(
      new Option(
        "-j, --jobs <n>",
        `threads for heavy passes, this one and n − 1 workers (default and most: available cores, here ${availableParallelism()})`,
      )
        .env("KEEL_JOBS")
        .argParser(parseJobs),
    )
    .addOption(
      new Option(
        "--time-limit <seconds>",
        `stop an analysis that runs longer, writing nothing (exit ${EXIT.timeLimit}); 0 for no limit (default: ${DEFAULT_TIME_LIMIT_SECONDS})`,
      )
        .env("KEEL_TIME_LIMIT")
        .argParser(parseTimeLimit),
    )
    .exitOverride()
    .showHelpAfterError(false);
  for (const add of [addCheckCommand, addAnalyzeCommand, addBuildCommand, addVerifyCommand, addSchemaCommand])
    add(program);
  for (const cmd of program.commands) cmd.exitOverride();
  return program;
}

export async function main(argv: string[]): Promise<number> {
  const program = buildProgram();
  try {
    await program.parseAsync(argv, { from: "user" });
    return EXIT.ok;
  } catch (err) {
    return exitCodeOf(err);
  } finally {
    const clock = clocks.get(program);
    if (clock) process.stderr.write(clock.report() + "\n");
  }
}

/** The exit code for what the command threw, with its message on stderr. */
function exitCodeOf(err: unknown): number {
  if (err instanceof CliExit) {
    if (err.message) process.stderr.write(err.message + "\n");
    return err.code;
  }
  if (err instanceof CommanderError) {
    // help and version are successful exits; commander already printed them. Help shown because
    // no command was given ("commander.help" with exit code 1) is a usage error.
    if (err.code === "commander.helpDisplayed" || err.code === "commander.version") return EXIT.ok;
    if (err.code === "commander.help" && err.exitCode === 0) return EXIT.ok;
    return EXIT.input;
  }
  process.stderr.write(messages.internal((err as Error)?.message ?? String(err)) + "\n");
  if (process.env.KEEL_DEBUG) process.stderr.write(String((err as Error)?.stack) + "\n");
  return EXIT.internal;
}
