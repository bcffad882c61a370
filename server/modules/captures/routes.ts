import type { Request } from 'express';
import * as z from 'zod';
import { Capture } from '../../db/models/index.ts';
import type { Deps } from '../../lib/deps.ts';
import { AppError, badRequest, conflict, notFound } from '../../lib/errors.ts';
import type { RouteDef } from '../../lib/routes.ts';
import { parseInput } from '../../lib/validate.ts';
import { PREVIEW_MEMORY_BYTES, previewBytes } from '../../../shared/traces/preview-budget.ts';
import { channelFilesSchema, type ChannelFiles } from '../../traces/channel-files.ts';
import { channelFilesWritten, missingAsPending, tracesPending } from '../../traces/channel-files-in-flight.ts';
import { readWindow, recordExtent, type TraceWindow } from '../../traces/read-window.ts';

/** Routes addressed by a capture id find their lab from the capture itself. */
export async function labOfCapture(req: Request): Promise<string | null> {
  const capture = await Capture.findByPk(req.params.captureId as string, { attributes: ['labId'] });
  return capture?.labId ?? null;
}

const seconds = z
  .string()
  .trim()
  .regex(/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/, 'must be a number of seconds, e.g. 0.0015 or 1.5e-3')
  .transform(Number)
  .refine(Number.isFinite, 'must be a finite number of seconds');

/** `GET /api/captures/:captureId/window` query: channel by index or name, window in seconds, column count. */
export const windowQuerySchema = z
  .object({
    /** Channel index (0, 1, …) or name as shown in the capture ("CH1", "Gate A"). */
    channel: z.string().trim().min(1, 'name a channel by index or name').default('0'),
    /** Window start, s; defaults to the first sample. */
    from: seconds.optional(),
    /** Window end, s (inclusive); defaults to the last sample. */
    to: seconds.optional(),
    /** Most (min, max) columns in the answer, usually the plot width in pixels. */
    points: z.coerce.number().int('must be a whole number').min(10).max(10_000).default(1000),
  })
  .refine((q) => q.from === undefined || q.to === undefined || q.from <= q.to, {
    path: ['from'],
    message: 'must not be later than to',
  });

function channelIndexOf(files: ChannelFiles, wanted: string): number {
  if (/^\d+$/.test(wanted) && Number(wanted) < files.channels.length) return Number(wanted);
  const exact = files.channels.findIndex((c) => c.name === wanted);
  if (exact >= 0) return exact;
  const folded = files.channels.findIndex((c) => c.name.toLowerCase() === wanted.toLowerCase());
  if (folded >= 0) return folded;
  const list = files.channels.map((c) => `${c.index} (${c.name})`).join(', ');
  throw badRequest(`Please correct the request: channel: this capture has no channel "${wanted}"; it has ${list || 'no channels'}.`);
}

/** The live preview reads whole channels; beyond this many samples (32 MB a channel) it would burden the browser. */


const samplesQuerySchema = z.object({
  /** Channel index or name, or "time" for the time column of an unevenly sampled capture. */
  channel: z.string().trim().min(1).default('0'),
});

/** The channel files of a capture of the caller's lab that has been read; 409 while it is not. */
async function readyFiles(req: Request, deps: Deps): Promise<ChannelFiles> {
  const capture = await Capture.findOne({ where: { id: req.params.captureId as string, labId: req.lab!.id }, attributes: ['id', 'state', 'error', 'channels'] });
  if (!capture) throw notFound('No such capture.');
  if (capture.state === 'failed') throw conflict(`This capture could not be read: ${capture.error ?? 'unknown reason'}`);
  if (capture.state !== 'ready') throw conflict('This capture is still being read; try again in a moment.');
  await channelFilesWritten(capture.id);
  const parsed = channelFilesSchema.safeParse(capture.channels);
  if (!parsed.success) {
    deps.logger.error({ captureId: capture.id, issues: parsed.error.issues }, 'capture channel files descriptor is invalid');
    throw new AppError(500, 'internal', 'The stored channel files of this capture are damaged.');
  }
  return parsed.data;
}

/**
 * Refuses a record whose time base does not fit in a number: captures stored before the importer bounded times
 * (±1e12 s) can have t0 + (n − 1)·dt overflow to Infinity, which JSON cannot carry (it would arrive as null) and
 * no plot can place (issue 12 review).
 */
function requireFiniteTimeBase(files: ChannelFiles): void {
  const extent = recordExtent(files);
  if (!extent || (Number.isFinite(extent.first) && Number.isFinite(extent.last))) return;
  const base = files.time.kind === 'uniform' ? `t0 = ${files.time.t0} s, dt = ${files.time.dt} s over ${files.length} samples` : 'its time column';
  throw conflict(
    `The stored time base of this capture does not fit in a number (${base}: it ends at ${extent.last} s), so its traces cannot be sent. ` +
    'It was stored before the importer checked times (±1e12 s from the trigger); upload the file again, or correct its time column.',
  );
}

/**
 * A window as JSON can carry it: ±Infinity (a sample stored before the importer bounded values; a Float32 file
 * turns anything past ±3.4e38 into it) is sent as null, no valid sample, as the importer now reads such a sample.
 * readWindow itself keeps it, so the report can name the channel instead of drawing a gap.
 */
function jsonWindow(window: TraceWindow): TraceWindow {
  const clean = (values: (number | null)[]) => values.map((v) => (v === null || Number.isFinite(v) ? v : null));
  return window.raw ? { ...window, v: clean(window.v) } : { ...window, min: clean(window.min), max: clean(window.max) };
}

export function captureRoutes(deps: Deps): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/captures/:captureId/samples',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfCapture },
      summary: "One channel's samples as little-endian Float32 (channel=time: an explicit time column as Float64), for the browser's live preview; 503 (try again) in the moment its trace files are still being written",
      query: samplesQuerySchema,
      async handler(req, res) {
        const query = res.locals.query as z.infer<typeof samplesQuerySchema>;
        const files = await readyFiles(req, deps);
        requireFiniteTimeBase(files);
        let key: string;
        let bytes: number;
        if (query.channel === 'time') {
          if (files.time.kind !== 'explicit') throw badRequest('This capture is evenly sampled: its times are t0 + i·dt from the capture record, not a column.');
          key = files.time.key;
          bytes = files.length * 8;
        } else {
          const channel = files.channels[channelIndexOf(files, query.channel)];
          key = channel.samplesKey;
          bytes = channel.length * 4;
        }
        // The browser's preview budget (shared/traces/preview-budget.ts): a record that cannot fit a tab is not sent.
        if (previewBytes(files.length, files.channels.length, files.time.kind === 'explicit') > PREVIEW_MEMORY_BYTES) {
          throw new AppError(413, 'too_large', `This record has ${files.length.toLocaleString('en')} samples in ${files.channels.length} channel${files.channels.length === 1 ? '' : 's'}, more than the live preview holds in a browser tab (${Math.round(PREVIEW_MEMORY_BYTES / 1e6)} MB). Recompute on the server instead.`);
        }
        res.set({ 'Content-Type': 'application/octet-stream', 'Content-Length': String(bytes), 'X-Sample-Count': String(files.length), 'Cache-Control': 'no-store' });
        if ((await deps.blobStore.stat(key))?.size !== bytes) throw tracesPending();
        const stream = deps.blobStore.openRead(key);
        stream.on('error', (err) => res.destroy(err));
        stream.pipe(res);
      },
    },
    {
      method: 'get',
      path: '/api/captures/:captureId/window',
      access: { kind: 'lab', permission: 'lab:read', labOf: labOfCapture },
      summary: 'Min/max columns (or raw samples at full zoom) of one channel over a time window; null marks no valid (finite) sample. 409 while the capture is not read, or when its stored time base does not fit in a number; 503 (try again) in the moment its trace files are still being written',
      async handler(req, res) {
        const query = parseInput(windowQuerySchema, req.query);
        const capture = await Capture.findOne({
          where: { id: req.params.captureId as string, labId: req.lab!.id },
          attributes: ['id', 'state', 'error', 'channels'],
        });
        if (!capture) throw notFound('No such capture.');
        if (capture.state === 'failed') {
          throw conflict(`This capture could not be read, so it has no traces: ${capture.error ?? 'no reason was recorded'}`);
        }
        if (capture.state !== 'ready') {
          throw conflict(`This capture is still being read (state: ${capture.state}); its traces are available once it is ready.`);
        }
        const parsed = channelFilesSchema.safeParse(capture.channels);
        if (!parsed.success) {
          deps.logger.error({ captureId: capture.id, issues: parsed.error.issues }, 'capture channel files descriptor is invalid');
          throw new AppError(500, 'internal', 'The stored trace files of this capture are not in a form this server can read.', undefined, {
            isOperational: false,
          });
        }
        await channelFilesWritten(capture.id);
        const files = parsed.data;
        const index = channelIndexOf(files, query.channel);
        requireFiniteTimeBase(files);
        const extent = recordExtent(files);
        const from = query.from ?? extent?.first ?? 0;
        const to = query.to ?? Math.max(from, extent?.last ?? 0);
        if (from > to) throw badRequest('Please correct the request: from: must not be later than to');
        const window = await readWindow(deps.blobStore, files, index, from, to, query.points).catch(missingAsPending);
        const channel = files.channels[index];
        res.json({
          captureId: capture.id,
          channel: { index, name: channel.name, unit: channel.unit, sourceUnit: channel.sourceUnit },
          from,
          to,
          points: query.points,
          ...jsonWindow(window),
        });
      },
    },
  ];
}
