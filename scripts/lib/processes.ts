// Child processes of the start script and the test helpers: prefixed output, a record of the last lines, and a stop
// that escalates from SIGTERM to SIGKILL.
import { spawn } from 'node:child_process';
import { createInterface } from 'node:readline';

export interface ChildOptions {
  /** Short name used in the output prefix ("[api] …") and in error messages. */
  name: string;
  command: string;
  args: string[];
  env?: NodeJS.ProcessEnv;
  cwd?: string;
  /**
   * Print each output line with the "[name] " prefix; false only keeps the lines (see `output()`).
   * @default true
   */
  echo?: boolean;
  /**
   * How many of the last output lines to keep for error messages.
   * @default 200
   */
  keepLines?: number;
}

export interface ExitStatus {
  code: number | null;
  signal: NodeJS.Signals | null;
}

export interface ChildHandle {
  readonly name: string;
  readonly pid: number;
  /** Settles when the process has exited. */
  readonly exited: Promise<ExitStatus>;
  hasExited(): boolean;
  /** The last output lines (stdout and stderr interleaved). */
  output(): string;
  /** SIGTERM, then SIGKILL to its whole process group after `timeoutMs`; resolves when it has exited. */
  stop(timeoutMs?: number): Promise<ExitStatus>;
}

/** Describes an exit for a person: "exit code 1" or "signal SIGKILL". */
export function describeExit(status: ExitStatus): string {
  return status.signal ? `signal ${status.signal}` : `exit code ${status.code}`;
}

/**
 * Starts a child in its own process group, so that a stop reaches the grandchildren too (tsx runs the script in a
 * second node process) and a Ctrl-C in the terminal reaches only the supervisor, which stops children in order.
 */
export function spawnChild(options: ChildOptions): ChildHandle {
  const { name, command, args, env = process.env, cwd = process.cwd(), echo = true, keepLines = 200 } = options;
  const child = spawn(command, args, { cwd, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
  const lines: string[] = [];
  const keep = (line: string, stream: NodeJS.WriteStream): void => {
    lines.push(line);
    if (lines.length > keepLines) lines.shift();
    if (echo) stream.write(`[${name}] ${line}\n`);
  };
  createInterface({ input: child.stdout }).on('line', (line) => keep(line, process.stdout));
  createInterface({ input: child.stderr }).on('line', (line) => keep(line, process.stderr));

  let status: ExitStatus | null = null;
  const exited = new Promise<ExitStatus>((resolve) => {
    child.on('error', (error) => {
      keep(`could not start ${command}: ${error.message}`, process.stderr);
      status = { code: 127, signal: null };
      resolve(status);
    });
    child.on('exit', (code, signal) => {
      status = { code, signal };
      // Whatever the child left behind in its group goes with it.
      killGroup(child.pid, 'SIGKILL');
      resolve(status);
    });
  });

  let stopping: Promise<ExitStatus> | null = null;
  return {
    name,
    pid: child.pid ?? -1,
    exited,
    hasExited: () => status !== null,
    output: () => lines.join('\n'),
    stop: (timeoutMs = 10_000) => {
      stopping ??= (async () => {
        if (status) return status;
        // The leader alone gets SIGTERM: tsx relays it to the script once, so its shutdown handler runs once.
        try {
          child.kill('SIGTERM');
        } catch {
          // already gone
        }
        const timer = setTimeout(() => {
          if (!status) {
            process.stderr.write(`[${name}] did not stop within ${timeoutMs / 1000} s of SIGTERM; killing it\n`);
            killGroup(child.pid, 'SIGKILL');
          }
        }, timeoutMs);
        const result = await exited;
        clearTimeout(timer);
        return result;
      })();
      return stopping;
    },
  };
}

function killGroup(pid: number | undefined, signal: NodeJS.Signals): void {
  if (!pid) return;
  try {
    process.kill(-pid, signal);
  } catch {
    // the group is empty: nothing left to kill
  }
}

/** Polls `url` until it answers 200, a child of `watch` exits (rejects naming it) or `timeoutMs` passes. */
export async function waitForHttp(url: string, options: { timeoutMs?: number; watch?: ChildHandle[] } = {}): Promise<void> {
  const { timeoutMs = 60_000, watch = [] } = options;
  const deadline = Date.now() + timeoutMs;
  let last: string;
  for (;;) {
    const dead = watch.find((child) => child.hasExited());
    if (dead) {
      throw new Error(`${dead.name} exited (${describeExit(await dead.exited)}) before ${url} answered`);
    }
    try {
      const response = await fetch(url, { signal: AbortSignal.timeout(2_000) });
      if (response.status === 200) return;
      last = `HTTP ${response.status}`;
    } catch (error) {
      last = (error as Error).message;
    }
    if (Date.now() > deadline) throw new Error(`${url} did not answer 200 within ${timeoutMs / 1000} s (last: ${last})`);
    await new Promise((resolve) => setTimeout(resolve, 150));
  }
}

export interface SupervisedOptions extends ChildOptions {
  /**
   * Wait before the first restart after a crash; each further crash doubles it, up to `maxBackoffMs`.
   * @default 1000
   */
  backoffMs?: number;
  /** @default 30000 */
  maxBackoffMs?: number;
  /**
   * A run at least this long counts as healthy: the next crash waits `backoffMs` again.
   * @default 60000
   */
  stableMs?: number;
  /** Where the supervisor says what it does ("worker exited (signal SIGKILL); restarting in 1 s"). @default stderr */
  say?: (line: string) => void;
}

export interface SupervisedChild {
  readonly name: string;
  /** The process running now (a new one after each restart). */
  current(): ChildHandle;
  /** How many times it was restarted. */
  restarts(): number;
  /** Stops the child and cancels any restart to come; resolves when it has exited. */
  stop(timeoutMs?: number): Promise<ExitStatus>;
}

/**
 * Runs a long-lived child and starts it again when it exits (issue 12, item 7): a crashed worker or API server is
 * restarted with a growing wait, logged, while everything else keeps running. Only `stop()` ends it for good.
 */
export function superviseChild(options: SupervisedOptions): SupervisedChild {
  const { backoffMs = 1000, maxBackoffMs = 30_000, stableMs = 60_000, say = (line: string) => process.stderr.write(`${line}\n`) } = options;
  let child = spawnChild(options);
  let startedAt = Date.now();
  let restarts = 0;
  let wait = backoffMs;
  let stopping = false;
  let timer: NodeJS.Timeout | null = null;
  const watch = (handle: ChildHandle): void => {
    void handle.exited.then((status) => {
      if (stopping) return;
      if (Date.now() - startedAt >= stableMs) wait = backoffMs;
      say(`[${options.name}] exited (${describeExit(status)}); restarting in ${wait / 1000} s`);
      timer = setTimeout(() => {
        timer = null;
        if (stopping) return;
        restarts++;
        child = spawnChild(options);
        startedAt = Date.now();
        say(`[${options.name}] restarted (pid ${child.pid}, restart ${restarts})`);
        watch(child);
      }, wait);
      wait = Math.min(maxBackoffMs, wait * 2);
    });
  };
  watch(child);
  return {
    name: options.name,
    current: () => child,
    restarts: () => restarts,
    stop: (timeoutMs) => {
      stopping = true;
      if (timer) clearTimeout(timer);
      return child.stop(timeoutMs);
    },
  };
}
