/**
 * The bench uploader: sends scope exports to Gatepost as they are saved, through the public API with a personal
 * token, and prints one line per shot once its result is in.
 *
 *   npm run --silent bench -- watch DIR --campaign NAME|ID [options]
 *   npm run --silent bench -- upload FILE... (--shot ID | --campaign NAME|ID) [options]
 *
 * Result lines go to stdout; what it is doing (waiting for the server, skipping a file seen before) goes to stderr.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { homedir } from 'node:os';
import { basename, join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { createHash } from 'node:crypto';
import { ApiError, createBenchApi, TransientError, withRetry, type BenchApi, type RetryOptions } from './api-client.ts';
import { FolderWatch, sha256OfFile, type StableFile } from './folder-watch.ts';
import { Journal } from './journal.ts';
import { formatShotLine, logNextShot, readOutcome, resolveCampaign, uploadFiles, type CampaignRef, type ShotOutcome } from './shot-flow.ts';

const USAGE = `usage:
  npm run --silent bench -- watch DIR --campaign NAME|ID [--lab LAB] [--settle S] [--group S] [--skip-existing] [--journal FILE]
  npm run --silent bench -- upload FILE... (--shot ID | --campaign NAME|ID [--lab LAB])
common options: --server URL (or GATEPOST_URL; default http://127.0.0.1:8640)
                --token-file FILE (default ~/.config/gatepost/token; GATEPOST_TOKEN wins over the default file)`;

class UsageError extends Error {}

const note = (line: string): void => {
  process.stderr.write(`bench: ${line}\n`);
};

function readToken(tokenFile: string | undefined): string {
  const file = tokenFile ?? join(process.env.XDG_CONFIG_HOME || join(homedir(), '.config'), 'gatepost', 'token');
  if (!tokenFile && process.env.GATEPOST_TOKEN) return process.env.GATEPOST_TOKEN.trim();
  if (!existsSync(file)) {
    throw new UsageError(`no API token: set GATEPOST_TOKEN or put the token in ${file} (create one under "API tokens" in Gatepost)`);
  }
  if ((statSync(file).mode & 0o077) !== 0) note(`${file} can be read by other users of this computer; chmod 600 it`);
  const token = readFileSync(file, 'utf8').trim();
  if (!token) throw new UsageError(`${file} is empty`);
  return token;
}

function retrying(signal?: AbortSignal): RetryOptions {
  let announced = false;
  return {
    signal,
    onRetry(reason, delayMs, attempt) {
      // One line when an outage starts, then one every few attempts: enough to see it is still trying.
      if (!announced || attempt % 5 === 0) note(`${reason}; trying again in ${(delayMs / 1000).toFixed(1)} s (attempt ${attempt})`);
      announced = true;
    },
  };
}

/** Polls the shot until nothing is being read or computed; retries through outages. */
async function waitForOutcome(api: BenchApi, shotId: string, signal?: AbortSignal): Promise<ShotOutcome> {
  for (;;) {
    const outcome = await withRetry(() => readOutcome(api, shotId), retrying(signal));
    if (outcome) return outcome;
    if (signal?.aborted) throw new TransientError('stopped while waiting for the result');
    await new Promise((r) => setTimeout(r, 500));
  }
}

const groupKey = (shas: string[]) => createHash('sha256').update([...shas].sort().join(',')).digest('hex').slice(0, 16);

async function watch(api: BenchApi, folder: string, values: Record<string, string | boolean | string[] | undefined>): Promise<number> {
  if (!existsSync(folder) || !statSync(folder).isDirectory()) throw new UsageError(`${folder} is not a folder`);
  const journal = new Journal(typeof values.journal === 'string' ? resolve(values.journal) : Journal.besideFolder(folder));
  const seconds = (v: unknown, fallback: number) => (typeof v === 'string' ? Math.round(Number(v) * 1000) : fallback);
  const settleMs = seconds(values.settle, 1000);
  const groupMs = seconds(values.group, 3000);
  if (!(settleMs >= 0) || !(groupMs >= 0)) throw new UsageError('--settle and --group take a number of seconds');
  const stop = new AbortController();
  for (const sig of ['SIGINT', 'SIGTERM'] as const) process.once(sig, () => stop.abort());

  const ref: CampaignRef = await withRetry(() => resolveCampaign(api, String(values.campaign), values.lab as string | undefined), retrying(stop.signal));
  const folderWatch = new FolderWatch(folder, { settleMs, groupMs });
  if (values['skip-existing']) {
    note(`passing over the ${await folderWatch.ignoreExisting()} file(s) already in the folder`);
  }
  note(`watching ${resolve(folder)} for ${ref.campaignName} (${ref.labName}) on ${api.baseUrl}; journal ${journal.path}`);

  const queue: StableFile[][] = [];
  const waiting = new Set<Promise<void>>();

  async function send(group: StableFile[]): Promise<void> {
    const key = groupKey(group.map((f) => f.sha256));
    const names = group.map((f) => f.name);
    const known = journal.shotOfGroup(key);
    const shot = known ? { id: known.shotId, number: known.number } : await withRetry(() => logNextShot(api, ref, key, names), retrying(stop.signal));
    if (!known) journal.recordShot(key, shot.id, shot.number);
    await withRetry(() => uploadFiles(api, shot.id, group.map((f) => ({ path: f.path, name: f.name }))), retrying(stop.signal));
    for (const f of group) journal.recordFile(f.sha256, f.name, shot.id);
    note(`shot #${shot.number}: sent ${names.join(', ')}; waiting for the result`);
    const p = waitForOutcome(api, shot.id, stop.signal)
      .then((outcome) => {
        process.stdout.write(`${formatShotLine(outcome, names)}\n`);
      })
      .catch((err: Error) => note(`shot #${shot.number}: ${err.message}`))
      .finally(() => waiting.delete(p));
    waiting.add(p);
  }

  const sender = (async () => {
    while (!stop.signal.aborted) {
      const group = queue.shift();
      if (!group) {
        await new Promise((r) => setTimeout(r, 100));
        continue;
      }
      try {
        await send(group);
      } catch (err) {
        if (stop.signal.aborted) break;
        // Refused for good (a permission, a file too large): say so and go on with the next shot.
        process.stdout.write(`${group.map((f) => f.name).join(', ')}  not sent: ${(err as Error).message}\n`);
      }
    }
  })();

  while (!stop.signal.aborted) {
    for (const group of await folderWatch.poll()) {
      const fresh = new Map<string, StableFile>();
      for (const f of group) {
        const earlier = journal.uploaded(f.sha256);
        if (earlier) note(`${f.name}: the same content was sent before (as ${earlier.name}); not sent again`);
        else if (!fresh.has(f.sha256)) fresh.set(f.sha256, f);
      }
      if (fresh.size > 0) queue.push([...fresh.values()]);
    }
    await new Promise((r) => setTimeout(r, folderWatch.pollMs));
  }
  await sender;
  if (queue.length > 0 || waiting.size > 0) {
    note(`stopped; ${queue.length} group(s) not yet sent will be sent at the next start, ${waiting.size} result(s) not yet in are on the server`);
  }
  // Stopped on purpose: a clean exit. Shots that failed have said so on their own lines.
  return 0;
}

async function upload(api: BenchApi, files: string[], values: Record<string, string | boolean | string[] | undefined>): Promise<number> {
  if (files.length === 0) throw new UsageError('name one or more files to upload');
  if (!values.shot === !values.campaign) throw new UsageError('upload needs --shot ID or --campaign NAME|ID (one of them)');
  for (const f of files) if (!existsSync(f) || !statSync(f).isFile()) throw new UsageError(`${f} is not a file`);
  const shas = await Promise.all(files.map(sha256OfFile));
  const names = files.map((f) => basename(f));
  let shotId: string;
  if (typeof values.shot === 'string') {
    shotId = values.shot;
  } else {
    const ref = await withRetry(() => resolveCampaign(api, String(values.campaign), values.lab as string | undefined), retrying());
    shotId = (await withRetry(() => logNextShot(api, ref, groupKey(shas), names), retrying())).id;
  }
  await withRetry(() => uploadFiles(api, shotId, files.map((f, i) => ({ path: f, name: names[i] }))), retrying());
  const outcome = await waitForOutcome(api, shotId);
  process.stdout.write(`${formatShotLine(outcome, names)}\n`);
  return outcome.speed ? 0 : 1;
}

async function main(argv: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      campaign: { type: 'string' }, lab: { type: 'string' }, shot: { type: 'string' }, server: { type: 'string' },
      'token-file': { type: 'string' }, journal: { type: 'string' }, settle: { type: 'string' }, group: { type: 'string' },
      'skip-existing': { type: 'boolean' }, help: { type: 'boolean', short: 'h' },
    },
  });
  const [command, ...rest] = positionals;
  if (values.help || !command) {
    process.stdout.write(`${USAGE}\n`);
    return values.help ? 0 : 2;
  }
  const api = createBenchApi({ baseUrl: values.server ?? process.env.GATEPOST_URL ?? 'http://127.0.0.1:8640', token: readToken(values['token-file']) });
  if (command === 'watch') {
    if (rest.length !== 1 || !values.campaign) throw new UsageError('watch needs one folder and --campaign NAME|ID');
    return watch(api, rest[0], values);
  }
  if (command === 'upload') return upload(api, rest, values);
  throw new UsageError(`unknown command "${command}"`);
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (err: unknown) => {
    if (err instanceof UsageError || String((err as { code?: string }).code).startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`bench: ${(err as Error).message}\n${USAGE}\n`);
      process.exit(2);
    }
    if (err instanceof ApiError) {
      process.stderr.write(`bench: the server refused: ${err.message}\n`);
      process.exit(1);
    }
    process.stderr.write(`bench: ${(err as Error).message}\n`);
    process.exit(1);
  },
);
