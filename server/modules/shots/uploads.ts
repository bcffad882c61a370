import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { mkdir, rm } from 'node:fs/promises';
import path from 'node:path';
import type { Request, Response } from 'express';
import multer from 'multer';
import { UniqueConstraintError } from 'sequelize';
import { Capture, Shot } from '../../db/models/index.ts';
import { recordAudit } from '../../lib/audit.ts';
import { clientIp } from '../../lib/client-ip.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, badRequest } from '../../lib/errors.ts';

export const MAX_FILES_PER_UPLOAD = 32;

async function sha256OfFile(file: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/** Runs multer on this request (after the access guard, so nobody unauthorised can fill the disk). */
function receiveFiles(deps: Deps, req: Request, res: Response): Promise<Express.Multer.File[]> {
  const dir = path.join(deps.config.dataDir, 'uploads');
  const upload = multer({
    storage: multer.diskStorage({ destination: (_req, _file, cb) => void mkdir(dir, { recursive: true }).then(() => cb(null, dir), (e: Error) => cb(e, dir)) }),
    limits: { fileSize: deps.config.uploadLimitBytes, files: MAX_FILES_PER_UPLOAD },
  }).array('files', MAX_FILES_PER_UPLOAD);
  return new Promise((resolve, reject) => {
    upload(req, res, (err: unknown) => {
      if (!err) return resolve((req.files as Express.Multer.File[] | undefined) ?? []);
      if (err instanceof multer.MulterError) {
        const gb = (deps.config.uploadLimitBytes / 1024 ** 3).toPrecision(3);
        const messages: Partial<Record<multer.ErrorCode, string>> = {
          LIMIT_FILE_SIZE: `A file is larger than this installation accepts (${gb} GB). Nothing was stored.`,
          LIMIT_FILE_COUNT: `At most ${MAX_FILES_PER_UPLOAD} files per upload. Nothing was stored.`,
          LIMIT_UNEXPECTED_FILE: 'Send the files in the multipart field "files". Nothing was stored.',
        };
        return reject(new AppError(err.code === 'LIMIT_FILE_SIZE' ? 413 : 400, 'bad_upload', messages[err.code] ?? `Upload refused: ${err.message}`));
      }
      reject(err);
    });
  });
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
 * the capture row is the record of work to do, so nothing is lost.
 */
export async function acceptUpload(deps: Deps, req: Request, res: Response, shot: Shot): Promise<UploadedCaptureView[]> {
  const files = await receiveFiles(deps, req, res);
  try {
    if (files.length === 0) throw badRequest('No file received: send one or more scope CSV files in the multipart field "files".');
    const views: UploadedCaptureView[] = [];
    const fresh: Capture[] = [];
    for (const file of files) {
      const sha256 = await sha256OfFile(file.path);
      const storageKey = `labs/${shot.labId}/raw/${sha256}`;
      if (!(await deps.blobStore.exists(storageKey))) await deps.blobStore.putFile(storageKey, file.path);
      // Browsers send the name as Latin-1 bytes of its UTF-8 form; undo that so "µs-run.csv" stays readable.
      const fileName = Buffer.from(file.originalname, 'latin1').toString('utf8').slice(0, 255) || 'capture.csv';
      let capture = await Capture.findOne({ where: { shotId: shot.id, sha256 } });
      let duplicate = true;
      if (!capture) {
        try {
          capture = await Capture.create({
            labId: shot.labId, shotId: shot.id, fileName, sizeBytes: file.size, sha256, storageKey, uploadedBy: req.auth!.userId,
          });
          duplicate = false;
          fresh.push(capture);
        } catch (err) {
          // The same file in two parallel uploads: the other request recorded it.
          if (!(err instanceof UniqueConstraintError)) throw err;
          capture = await Capture.findOne({ where: { shotId: shot.id, sha256 }, rejectOnEmpty: true });
        }
      }
      views.push({ id: capture.id, fileName: capture.fileName, sizeBytes: Number(capture.sizeBytes), sha256, state: capture.state, duplicate });
    }
    if (fresh.length > 0) {
      if (shot.status !== 'in_review' && shot.status !== 'approved') await shot.update({ status: 'processing' });
      for (const capture of fresh) {
        await recordAudit({
          labId: shot.labId, actorId: req.auth!.userId, action: 'capture.uploaded', targetType: 'shot', targetId: shot.id,
          details: { captureId: capture.id, file: capture.fileName, bytes: Number(capture.sizeBytes), sha256: capture.sha256 }, ip: clientIp(req),
        });
        await deps.queues.addIngestOrDefer({ captureId: capture.id, attempt: capture.ingestAttempt }, deps.logger);
      }
    }
    return views;
  } finally {
    await Promise.allSettled(files.map((f) => rm(f.path, { force: true })));
  }
}
