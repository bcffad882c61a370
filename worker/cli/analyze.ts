/**
 * `npm run --silent analyze -- FILE [--gate CHANNEL@POSITION_M]... [--spacing M] [--diameter M]
 *   [--position-tolerance M] [--timebase-ppm N] [--dt S] [--json]`
 *
 * Analyses one scope export with the same engine the worker runs. Exit codes: 0 analysed (even when gates
 * missed, or the result is marked "check the time base": both are results, stated in the output), 2 unreadable
 * input or bad arguments (one line on stderr).
 */
import { statSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import { setFlagsFromString } from 'node:v8';
import type { ShotAnalysis } from '../../shared/analysis/types.ts';
import type { AnalysisOptionsInput } from '../../shared/contracts/analysis.ts';
import type { ImportedCapture } from '../../shared/contracts/capture.ts';
import { readCaptureFile, readsInTwoThreads } from '../import/read-capture-file.ts';
import { ScanThread } from '../import/scan-thread.ts';
import { prepareInTwoThreads } from './prepare-in-two-threads.ts';
import { resultNotes } from './result-notes.ts';

const USAGE = 'usage: analyze FILE [--gate CHANNEL@POSITION_M]... [--spacing M] [--diameter M] [--position-tolerance M] [--timebase-ppm N] [--dt S] [--json]';

export interface CliIo {
  stdout: (text: string) => void;
  stderr: (text: string) => void;
  /** Reads a capture file; the default is the worker's importer (the same one uploads go through). */
  readCapture?: (path: string, options: { dt?: number }) => Promise<ImportedCapture>;
}

class UsageError extends Error {}

interface CliArgs {
  file: string;
  gates: { channel: string; position: number }[];
  spacing?: number;
  diameter?: number;
  positionTolerance?: number;
  timebasePpm?: number;
  dt?: number;
  json: boolean;
}

function parseMetres(text: string | undefined, flag: string, unit = 'metres'): number {
  const value = text === undefined ? Number.NaN : Number(text);
  if (text === undefined || text.trim() === '' || !Number.isFinite(value)) {
    throw new UsageError(`${flag} needs a number of ${unit}, got ${text === undefined ? 'nothing' : `'${text}'`}`);
  }
  return value;
}

function parseArgs(argv: string[]): CliArgs {
  const args: CliArgs = { file: '', gates: [], json: false };
  const files: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--json') args.json = true;
    else if (a === '--gate') {
      const spec = argv[++i];
      const at = spec === undefined ? -1 : spec.lastIndexOf('@');
      if (spec === undefined || at <= 0) throw new UsageError(`--gate needs CHANNEL@POSITION_M (e.g. CH1@0.3), got ${spec === undefined ? 'nothing' : `'${spec}'`}`);
      args.gates.push({ channel: spec.slice(0, at), position: parseMetres(spec.slice(at + 1), `--gate ${spec}`) });
    } else if (a === '--spacing') {
      args.spacing = parseMetres(argv[++i], '--spacing');
      if (!(args.spacing > 0)) throw new UsageError('--spacing must be positive');
    } else if (a === '--diameter') {
      args.diameter = parseMetres(argv[++i], '--diameter');
      if (!(args.diameter > 0)) throw new UsageError('--diameter must be positive');
    } else if (a === '--position-tolerance') {
      args.positionTolerance = parseMetres(argv[++i], a);
      if (!(args.positionTolerance >= 0)) throw new UsageError('--position-tolerance must be zero or more metres');
    } else if (a === '--timebase-ppm') {
      args.timebasePpm = parseMetres(argv[++i], a, 'parts per million');
      if (!(args.timebasePpm >= 0)) throw new UsageError('--timebase-ppm must be zero or more');
    } else if (a === '--dt') {
      args.dt = parseMetres(argv[++i], a, 'seconds');
      if (!(args.dt > 0)) throw new UsageError('--dt must be a positive number of seconds');
    } else if (a.startsWith('--')) throw new UsageError(`unknown option ${a}`);
    else files.push(a);
  }
  if (files.length !== 1) throw new UsageError(files.length === 0 ? 'no capture file given' : `one capture file at a time, got ${files.length}`);
  args.file = files[0];
  return args;
}

const us = (t: number): string => `${(t * 1e6).toFixed(3)} µs`;

function summary(file: string, a: ShotAnalysis, captureWarnings: string[]): string {
  const lines: string[] = [`${file} (engine ${a.engineVersion})`];
  for (const g of a.gates) {
    const p = g.pulses[0];
    lines.push(
      g.status === 'ok' && p !== undefined
        ? `  gate ${g.channel} @ ${g.position} m: blocked ${us(p.start)} → ${us(p.end)} (width ${us(p.width)})`
        : `  gate ${g.channel} @ ${g.position} m: missed`,
    );
  }
  const notes = resultNotes(a, captureWarnings);
  if (a.speed !== null) {
    const how = a.speed.basis === 'fit' ? 'constant-deceleration fit' : a.speed.basis === 'pair' ? 'time of flight' : 'occlusion';
    lines.push(notes.flagged
      ? `speed (not a measurement: check the time base): ${Number(a.speed.value.toPrecision(3))} ± ${Number(a.speed.uncertainty.toPrecision(2))} m/s (${how}; U with k = 2)`
      : `speed: ${a.speed.value.toFixed(2)} ± ${a.speed.uncertainty.toFixed(2)} m/s (${how}; U with k = 2)`);
    for (const b of a.speed.budget) lines.push(`  ${b.group}: ${b.contribution.toPrecision(3)} m/s (${(100 * b.share).toFixed(1)} % of variance)`);
  } else lines.push('speed: none');
  if (a.fit !== null) lines.push(`deceleration: ${a.fit.deceleration.toPrecision(4)} ± ${a.fit.decelerationUncertainty.toPrecision(2)} m/s²`);
  for (const o of a.occlusion) lines.push(`occlusion ${o.channel} @ ${o.position} m: ${o.speed.toFixed(2)} ± ${o.uncertainty.toFixed(2)} m/s`);
  lines.push(...notes.lines);
  for (const w of a.warnings) lines.push(`warning: ${w}`);
  return lines.join('\n');
}

/** Runs the CLI on already-split arguments; returns the exit code. */
export async function runAnalyze(argv: string[], io: CliIo): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    io.stdout(
      `${USAGE}\n` +
        '  --gate CH@M   channel CH is a gate at M metres along the path (repeat; one channel may carry several gates)\n' +
        '  --spacing M   without --gate: every channel is a gate, in column order, M metres apart\n' +
        '  --diameter M  projectile length along the path, for occlusion speeds and the cross-check\n' +
        '  --position-tolerance M  half-width of each gate position\'s tolerance (default 0.0005 = ±0.5 mm)\n' +
        '  --timebase-ppm N        the scope clock\'s accuracy, ± parts per million (default 50)\n' +
        '  --dt S        sample interval in seconds, for a file that does not state one\n' +
        '  --json        one JSON object (gates, speed, warnings, …) instead of the summary\n',
    );
    return 0;
  }
  let args: CliArgs;
  try {
    args = parseArgs(argv);
  } catch (error) {
    io.stderr(`analyze: ${(error as Error).message}\n${USAGE}\n`);
    return 2;
  }
  // A deep record is read in two threads (readCaptureFile) and its channels prepared for the analysis in the same
  // two (prepareInTwoThreads): the second thread is made here, so that it outlives the read.
  const thread = io.readCapture === undefined && readsInTwoThreads(fileBytes(args.file)) ? new ScanThread({ prepares: true }) : null;
  try {
    return await analyzeRead(args, io, thread);
  } finally {
    await thread?.close();
  }
}

function fileBytes(path: string): number {
  try {
    return statSync(path).size;
  } catch {
    return 0; // the reader words the error
  }
}

async function analyzeRead(args: CliArgs, io: CliIo, thread: ScanThread | null): Promise<number> {
  let capture: ImportedCapture;
  // The engine (zod and the rest: some 50 ms to load) is loaded once the read is under way: the reader runs on this
  // thread without a pause until it waits for its second thread, so the engine loads in that wait instead of
  // delaying the start of that thread.
  let engine: Promise<typeof import('../../shared/analysis/analyze-shot.ts')> | undefined;
  try {
    const readOptions = args.dt === undefined ? {} : { dt: args.dt };
    const reading = (io.readCapture ?? ((path: string, options: { dt?: number }) => readCaptureFile(path, { ...options, thread: thread ?? undefined })))(args.file, readOptions);
    engine = import('../../shared/analysis/analyze-shot.ts');
    engine.catch(() => undefined);
    capture = await reading;
  } catch (error) {
    const e = error as NodeJS.ErrnoException;
    const reason = (e.code === 'ENOENT' ? 'no such file' : e.code === 'EISDIR' ? 'it is a folder' : e.message).split('\n')[0];
    // The importer's messages usually name the file already ("cannot open x.csv: no such file").
    io.stderr(reason.includes(args.file) ? `analyze: ${reason}\n` : `analyze: cannot read ${args.file}: ${reason}\n`);
    return 2;
  }
  const options: AnalysisOptionsInput = {};
  if (args.gates.length > 0) options.gates = args.gates;
  if (args.spacing !== undefined) options.spacing = args.spacing;
  if (args.diameter !== undefined) options.projectile = { length: args.diameter };
  if (args.positionTolerance !== undefined) options.positionTolerance = args.positionTolerance;
  if (args.timebasePpm !== undefined) options.timebaseAccuracyPpm = args.timebasePpm;
  if (args.gates.length === 0 && args.spacing === undefined && capture.channels.length > 1) {
    io.stderr(`analyze: ${args.file} has ${capture.channels.length} channels; give --spacing M or --gate CHANNEL@POSITION_M for each gate\n`);
    return 2;
  }
  const { analyzeShot, parseAnalysisOptions } = await engine;
  let analysis: ShotAnalysis;
  try {
    // Each thread now runs every pass of the analysis once over a deep record, with both cores busy. V8 compiles such
    // a loop while it runs (on-stack replacement) on a background thread, which then waits for a core while the loop
    // goes on in the interpreter; compiled on the spot instead, this thread's part took 109 ms against 132 ms, the
    // other's 126 against 128 (medians of 12 alternating runs on the 10 M-sample capture, 3 December 2026). The flag
    // is set here, once the read is done, and not on node's command line: any V8 flag there costs ~20 ms of start-up
    // (node's built-in code cache is made for the default flags). It changes when code is compiled, never what it
    // computes.
    if (thread !== null) setFlagsFromString('--no-concurrent-osr');
    const prepared = thread === null ? null : await prepareInTwoThreads(thread, capture, parseAnalysisOptions(options));
    analysis = analyzeShot(capture, options, prepared ?? undefined);
  } catch (error) {
    io.stderr(`analyze: ${args.file}: ${(error as Error).message.split('\n')[0]}\n`);
    return 2;
  }
  if (args.json) {
    const { engineVersion, gates, speed, flight, fit, occlusion, crossChecks, derived, warnings, channels, assumptions, timeBaseCheck } = analysis;
    const out = {
      file: args.file,
      engineVersion,
      gates,
      speed,
      flight,
      fit,
      occlusion,
      crossChecks,
      derived,
      channels: channels.map((c) => ({ name: c.name, status: c.status, reason: c.reason, polarity: c.polarity, levels: c.levels, noise: c.noise, candidate: c.candidate })),
      warnings,
      assumptions,
      timeBaseCheck,
      captureWarnings: capture.warnings,
    };
    io.stdout(`${JSON.stringify(out, null, 2)}\n`);
  } else io.stdout(`${summary(args.file, analysis, capture.warnings)}\n`);
  return 0;
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href) {
  runAnalyze(process.argv.slice(2), {
    stdout: (t) => process.stdout.write(t),
    stderr: (t) => process.stderr.write(t),
  }).then(
    (code) => {
      process.exitCode = code;
    },
    (error: unknown) => {
      process.stderr.write(`analyze: ${(error as Error).message}\n`);
      process.exitCode = 1;
    },
  );
}
