import { rm } from 'node:fs/promises';
import path from 'node:path';
import type { Request, Response } from 'express';
import multer from 'multer';
import { Op, UniqueConstraintError } from 'sequelize';
import { Capture, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, badRequest } from '../../lib/errors.ts';
import { channelFilesWriting } from '../../traces/channel-files-in-flight.ts';
import { captureFilesPrefix, placeChannelFiles, putChannelBlobs, syncChannelBlobs, type ChannelBlob } from '../../traces/write-channel-files.ts';
import type { ChannelFiles } from '../../traces/channel-files.ts';
import type { AnalysisOptionsInput } from '../../../shared/contracts/analysis.ts';
import { captureIntake, captureReceiver, FileTooLargeError, multipartFileName, type CaptureIntakeOptions, type ReceivedFile } from './capture-intake.ts';
import type { UploadReader } from './upload-reader.ts';
import { settleShot } from './settle-shot.ts';
import { endCaptureRead } from './end-capture-read.ts';
import { combinedChannelNames, defaultParameters, type PrecomputedVersion } from '../analyses/service.ts';
import { formatBytes } from '../../../shared/units/format-bytes.ts';
import { assertStorageRoom } from '../storage/service.ts';

export const MAX_FILES_PER_UPLOAD = 32;

/** A file received, with the name it is to be recorded under. */
type NamedFile = ReceivedFile & { fileName: string };

function intakeOptions(deps: Deps, shot: Shot): CaptureIntakeOptions {
  return {
    store: deps.blobStore, uploadsDir: path.join(deps.config.dataDir, 'uploads'), readFromBytes: deps.config.readUploadsFromBytes,
    limits: { maxChannels: deps.config.maxChannelsPerCapture, maxSamples: deps.config.maxSamplesPerChannel },
    parametersOnRead: (read, fileName) => soleFileParameters(shot.id, fileName, read.files),
  };
}

function fileTooLarge(deps: Deps): AppError {
  const gb = (deps.config.uploadLimitBytes / 1024 ** 3).toPrecision(3);
  return new AppError(413, 'bad_upload', `A file is larger than this installation accepts (${gb} GB). Nothing was stored.`);
}

/** A multipart/form-data request (files in the field "files"); any other is one file as the whole body. */
function isMultipart(req: Request): boolean {
  return mediaType(req) === 'multipart/form-data';
}

function mediaType(req: Request): string {
  return (req.headers['content-type'] ?? '').split(';')[0].trim().toLowerCase();
}

/**
 * Receives the file that is the whole request body (`?fileName=` names it): no multipart parsing, the bytes go
 * straight from the socket through the one pass of captureReceiver. For scripts and large files: the 330 MB deep
 * capture sent by curl to `npm start`'s API, four times each way alternating (3 December 2026), took 2.18 s as the
 * request body against 2.86 s as multipart (medians), the API using 3.82 against 4.82 CPU-s, its reading thread
 * included. bench/pipeline-deep.ts measures the whole pipeline both ways.
 */
async function receiveBody(deps: Deps, req: Request, shot: Shot, fileName: string | undefined): Promise<NamedFile[]> {
  // A form or JSON body holds no file (express.json has read a JSON one already).
  const type = mediaType(req);
  const form = type === 'application/x-www-form-urlencoded' || type === 'application/json' || type.endsWith('+json');
  const declared = Number(req.headers['content-length']);
  const empty = declared === 0 || (!Number.isFinite(declared) && req.headers['transfer-encoding'] === undefined);
  if (fileName === undefined) {
    // Nothing read yet: no body (or a form) is the "no file received" case; a file needs its name.
    if (empty || form) return [];
    throw badRequest('Name the file sent as the request body: add ?fileName=… (for example ?fileName=shot-12.csv) to the URL. Nothing was stored.');
  }
  if (form) {
    throw new AppError(415, 'bad_upload',
      `A ${type} body holds no file. Send the scope CSV file itself as the request body (Content-Type text/csv or application/octet-stream), or the files as multipart/form-data in the field "files". Nothing was stored.`);
  }
  if (Number.isFinite(declared) && declared > deps.config.uploadLimitBytes) throw fileTooLarge(deps);
  try {
    const file = await captureReceiver(intakeOptions(deps, shot))(req, req, deps.config.uploadLimitBytes, fileName);
    return [{ ...file, fileName }];
  } catch (err) {
    if (err instanceof FileTooLargeError) throw fileTooLarge(deps);
    throw err;
  }
}

/** Runs multer on this request (after the access guard, so nobody unauthorised can fill the disk). */
async function receiveFiles(deps: Deps, req: Request, res: Response, shot: Shot): Promise<NamedFile[]> {
  const files = await receiveMultipart(deps, req, res, shot);
  return files.map((file) => Object.assign(file, { fileName: multipartFileName(file.originalname) }));
}

function receiveMultipart(deps: Deps, req: Request, res: Response, shot: Shot): Promise<(Express.Multer.File & ReceivedFile)[]> {
  const upload = multer({
    storage: captureIntake(intakeOptions(deps, shot)),
    limits: { fileSize: deps.config.uploadLimitBytes, files: MAX_FILES_PER_UPLOAD },
  }).array('files', MAX_FILES_PER_UPLOAD);
  return new Promise((resolve, reject) => {
    upload(req, res, (err: unknown) => {
      if (!err) return resolve((req.files as (Express.Multer.File & ReceivedFile)[] | undefined) ?? []);
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') return reject(fileTooLarge(deps));
        const messages: Partial<Record<multer.ErrorCode, string>> = {
          LIMIT_FILE_COUNT: `At most ${MAX_FILES_PER_UPLOAD} files per upload. Nothing was stored.`,
          LIMIT_UNEXPECTED_FILE: 'Send the files in the multipart field "files". Nothing was stored.',
        };
        return reject(new AppError(400, 'bad_upload', messages[err.code] ?? `Upload refused: ${err.message}`));
      }
      // busboy's own parse errors: the body is not well-formed multipart (a NUL in a file name ends up here too).
      if (err instanceof Error && /^(Malformed|Unexpected end of form|Multipart: Boundary not found)/.test(err.message)) {
        return reject(new AppError(400, 'bad_upload',
          `The upload is not well-formed multipart/form-data (${err.message.toLowerCase()}); a file name holding a NUL or another control character does this. Nothing was stored.`));
      }
      reject(err);
    });
  });
}

function assertRequestSize(deps: Deps, bytes: number): void {
  if (bytes <= deps.config.uploadRequestLimitBytes) return;
  throw new AppError(413, 'bad_upload',
    `This upload is ${formatBytes(bytes)}; this installation accepts at most ${formatBytes(deps.config.uploadRequestLimitBytes)} per upload. ` +
    'Send the files in several uploads. Nothing was stored.');
}

export interface UploadedCaptureView {
  id: string;
  fileName: string;
  sizeBytes: number;
  sha256: string;
  state: string;
  /** The same bytes were already attached to this shot; nothing new was stored. */
  duplicate: boolean;
}

/**
 * Stores each uploaded file byte for byte under its SHA-256 (once per lab, whatever the shot), records a Capture
 * and queues its ingest job. A job that cannot be queued now (Redis away) is queued later by the worker's sweep:
 * the capture row is the record of work to do, so nothing is lost. The files come as multipart/form-data (field
 * "files", as browsers send them) or as one file that is the whole request body, named by `fileName`.
 */
export async function acceptUpload(deps: Deps, req: Request, res: Response, shot: Shot, fileName?: string): Promise<UploadedCaptureView[]> {
  // Both readers take the bytes as they are; a compressed body would fail half-way through.
  const encoding = (req.headers['content-encoding'] ?? 'identity').toLowerCase();
  if (encoding !== 'identity') {
    throw new AppError(400, 'bad_upload', `Send the files without Content-Encoding (this upload came as ${encoding}); scope CSV files are taken as they are. Nothing was stored.`);
  }
  // The request's declared size is checked against both limits before a byte of it is read.
  const declared = Number(req.headers['content-length']);
  if (Number.isFinite(declared)) {
    assertRequestSize(deps, declared);
    await assertStorageRoom(deps.config, shot.labId, declared, 'This upload');
  }
  const files = isMultipart(req) ? await receiveFiles(deps, req, res, shot) : await receiveBody(deps, req, shot, fileName);
  const fresh: { capture: Capture; reader: UploadReader | null }[] = [];
  let accepted = false;
  try {
    if (files.length === 0) {
      throw badRequest('No file received: send one or more scope CSV files in the multipart field "files", or one file as the request body with ?fileName=… in the URL.');
    }
    // A body sent without Content-Length (chunked) is checked once received, before anything is stored.
    const received = files.reduce((sum, file) => sum + file.size, 0);
    assertRequestSize(deps, received);
    await assertStorageRoom(deps.config, shot.labId, received, 'This upload');
    const views: UploadedCaptureView[] = [];
    for (const file of files) {
      const { sha256 } = file;
      const storageKey = `labs/${shot.labId}/raw/${sha256}`;
      if (!(await deps.blobStore.exists(storageKey))) {
        // On the store's own disk the received file becomes the blob by a rename: its bytes are not copied again.
        if (file.onStoreDisk) await deps.blobStore.adoptFile!(storageKey, file.path);
        else await deps.blobStore.putFile(storageKey, file.path);
      }
      const fileName = file.fileName.slice(0, 255) || 'capture.csv';
      let capture = await Capture.findOne({ where: { shotId: shot.id, sha256 } });
      let duplicate = true;
      if (capture?.removedAt) {
        // The same bytes as a file removed earlier: it comes back, and is read again like a new one.
        await capture.update({ removedAt: null, removedBy: null, ingestAttempt: capture.ingestAttempt + 1, state: 'queued', progress: 0, error: null });
        duplicate = false;
        fresh.push({ capture, reader: null });
      } else if (!capture) {
        try {
          capture = await Capture.create({
            labId: shot.labId, shotId: shot.id, fileName, sizeBytes: file.size, sha256, storageKey, uploadedBy: req.auth!.userId,
          });
          duplicate = false;
          fresh.push({ capture, reader: file.reader });
          file.reader = null;
        } catch (err) {
          // The same file in two parallel uploads: the other request recorded it.
          if (!(err instanceof UniqueConstraintError)) throw err;
          capture = await Capture.findOne({ where: { shotId: shot.id, sha256 }, rejectOnEmpty: true });
        }
      }
      views.push({ id: capture.id, fileName: capture.fileName, sizeBytes: Number(capture.sizeBytes), sha256, state: capture.state, duplicate });
    }
    if (fresh.length > 0) {
      await settleShot(shot.id);
      for (const entry of fresh) {
        const { capture, reader } = entry;
        await recordAudit({
          labId: shot.labId, actorId: req.auth!.userId, action: 'capture.uploaded', targetType: 'shot', targetId: shot.id,
          details: { captureId: capture.id, file: capture.fileName, bytes: Number(capture.sizeBytes), sha256: capture.sha256 }, ip: clientIp(req),
        });
        const data = { captureId: capture.id, attempt: capture.ingestAttempt };
        if (reader !== null && (await deps.queues.addIngestHeld(data, INGEST_HOLD_MS))) {
          // Not awaited: the answer goes out now, the channel files follow (the held job is the safety net).
          entry.reader = null;
          void storeReadChannels(deps, capture, reader);
        } else {
          await deps.queues.addIngestOrDefer(data, deps.logger);
        }
      }
    }
    accepted = true;
    return views;
  } finally {
    // Readers not handed on (duplicates, a failed request) stop here.
    await Promise.allSettled([...files, ...fresh].map((f) => f.reader?.close()));
    // A received file not adopted as its blob (the same bytes were stored already; a store without a disk of its
    // own, which copied it) is removed; after a request that went well, once the answer is out: unlinking the 330 MB
    // deep capture took 90-125 ms, all of it between the last byte and the answer (measured with strace on the lab
    // machine, 4 December 2026). Nothing depends on it: the staged file is never read again.
    const removed = Promise.allSettled(files.map((f) => rm(f.path, { force: true })));
    if (accepted) void removed;
    else await removed;
  }
}

/** How long the ingest job of an upload the API reads itself is held back before the worker reads the file instead. */
const INGEST_HOLD_MS = 60_000;

/**
 * Stores the channel files of an upload read while it arrived and marks its capture read, as the ingest job
 * would; then lets the held ingest job run, which finds the capture read and goes on with the shot's analysis.
 * Anything that goes wrong here (a file the reader refused, a full disk) leaves the capture queued: the worker
 * then reads the stored file and records what it finds, with the importer's message.
 *
 * What stands between the last byte and the result is kept short. Measured with the 10-million-sample capture
 * on the lab machine, preparing its channel files took 0.3–0.45 s in the thread and writing their 90 MB 0.25–1.1 s
 * (the bytes go into fresh memory), while the engine on the samples in memory took 0.1–0.2 s. So when the file is
 * the shot's only one:
 * - the thread, which still holds the samples, works out the automatic version's numbers first (it started on them
 *   when the last byte arrived, with the parameters the shot would give this file: UploadReader.analyseOnRead); the
 *   capture is recorded as read (its files' descriptor needs no file) and its version made with those numbers
 *   stored on it, in the same transaction (automaticVersionIn checks they are for the version's captures and
 *   parameters): no analysis job reads the files and runs the engine again, or hands the numbers over;
 * - then the files follow: those the trace plots read, then the full-precision values (read only by later
 *   recomputes; one asked for in between reads the stored upload instead, as readStoredChannels finds no values
 *   file). A trace request in between waits for them in this process (channelFilesWritten); if this process
 *   stops before they are all written, the held ingest job finds them missing and writes them from the upload.
 * With several files the analysis job reads every file's values, so all the files go first, as in the worker.
 * The files are written without waiting for the disk and synced afterwards: they can be made again from the
 * upload, which is on the disk before the upload is answered. A write or sync that fails puts the capture back in
 * the queue, so the worker writes them again from the stored file.
 */
async function storeReadChannels(deps: Deps, capture: Capture, reader: UploadReader): Promise<void> {
  const data = { captureId: capture.id, attempt: capture.ingestAttempt };
  let marked = 0;
  let filesWritten: () => void = () => {};
  try {
    const read = await reader.outcome;
    if ('problem' in read) {
      deps.logger.info({ captureId: capture.id, problem: read.problem }, 'upload not read in the API; the worker reads it');
      return;
    }
    const prefix = captureFilesPrefix(capture.labId, capture.id);
    const { files } = placeChannelFiles(prefix, { files: read.files, blobs: [] });
    const take = async (blobs: Promise<ChannelBlob[] | null>, what: string) => {
      const taken = await blobs;
      if (taken === null) throw new Error(`the reading thread stopped before it handed over ${what}`);
      return placeChannelFiles(prefix, { files: read.files, blobs: taken }).blobs;
    };
    // Only a capture still queued for this attempt: a worker that took the job over meanwhile has the last word.
    // Make the shot's analysis from here, as the ingest job would once it found the capture read: one job hand-over
    // less between the last byte and the result. The mark, the version and the shot's status are written in one
    // transaction under the shot's lock (endCaptureRead), so a file of the shot ending beside this one never shows
    // the shot "failed" in between. The released ingest job then finds the analysis keyed and done or queued already
    // (the same key, so never a second one) and only writes the status again.
    const markRead = async (precomputed: PrecomputedVersion | undefined) => {
      await endCaptureRead(deps, capture.shotId, {
        precomputed,
        write: async (transaction) => {
          [marked] = await Capture.update(
            { state: 'ready', progress: 100, layout: read.layout, channels: files, sampleCount: read.length, timeBase: files.time, warnings: read.warnings, error: null },
            { where: { id: capture.id, ingestAttempt: capture.ingestAttempt, state: 'queued' }, transaction },
          );
          return marked > 0;
        },
      });
    };
    const parameters = await soleFileParameters(capture.shotId, capture.fileName, files, capture.id);
    const outcome = parameters === null ? null : await reader.analyse(parameters);
    if (outcome !== null && 'problem' in outcome) deps.logger.info({ captureId: capture.id, problem: outcome.problem }, 'automatic version not worked out in the API; the worker does it');
    const precomputed = outcome !== null && 'results' in outcome ? { captureIds: [capture.id], parameters, results: outcome.results, ranAt: outcome.ranAt } : undefined;
    const written: ChannelBlob[] = [];
    if (precomputed === undefined) {
      written.push(...await take(reader.takeFiles(), 'the trace files'), ...await take(reader.takeKept(), 'the values'));
      await putChannelBlobs(deps.blobStore, written, { sync: false });
      await markRead(undefined);
    } else {
      channelFilesWriting(capture.id, new Promise<void>((resolve) => { filesWritten = resolve; }));
      await markRead(precomputed);
      if (marked === 0) return;
    }
    if (precomputed !== undefined) {
      const plots = await take(reader.takeFiles(), 'the trace files');
      await putChannelBlobs(deps.blobStore, plots, { sync: false });
      filesWritten();
      const values = await take(reader.takeKept(), 'the values');
      await putChannelBlobs(deps.blobStore, values, { sync: false });
      written.push(...plots, ...values);
    }
    await syncChannelBlobs(deps.blobStore, written);
  } catch (err) {
    deps.logger.warn({ captureId: capture.id, err: (err as Error).message }, 'reading the upload in the API failed; the worker reads it');
    if (marked > 0) {
      // Files not surely all on the disk: back to the queue, so the released ingest job writes them again from the stored file.
      await endCaptureRead(deps, capture.shotId, {
        write: async (transaction) => {
          const [back] = await Capture.update({ state: 'queued', progress: 0 }, { where: { id: capture.id, ingestAttempt: capture.ingestAttempt, state: 'ready' }, transaction });
          return back > 0;
        },
      })
        .catch((error: Error) => deps.logger.warn({ captureId: capture.id, err: error.message }, 'capture not put back in the queue'));
    }
  } finally {
    filesWritten();
    await reader.close();
    await deps.queues.releaseIngest(data).catch((err: Error) => deps.logger.warn({ captureId: capture.id, err: err.message }, 'held ingest job not released; it runs when its hold ends'));
  }
}

/**
 * The automatic version's parameters when this file is the shot's only one (none other ready or being read; its own
 * capture, `captureId`, left out once it has a row), so the reading thread can work out its numbers; null otherwise.
 * The same function automaticVersionIn uses. Asked when the read ends, before the row exists (the thread starts on
 * them at once: UploadReader.analyseOnRead), and again once the capture is recorded, which gives the same parameters
 * unless something changed meanwhile.
 */
async function soleFileParameters(shotId: string, fileName: string, files: ChannelFiles, captureId?: string): Promise<AnalysisOptionsInput | null> {
  const others = await Capture.count({
    where: { shotId, removedAt: null, ...(captureId !== undefined && { id: { [Op.ne]: captureId } }), state: { [Op.in]: ['queued', 'reading', 'ready'] } },
  });
  if (others > 0) return null;
  const shot = await Shot.findByPk(shotId);
  if (!shot || shot.deletedAt) return null;
  return defaultParameters(shot, combinedChannelNames([{ fileName, channels: files }]));
}
