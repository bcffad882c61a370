/**
 * What the uploader does with a group of files, through the public API only, exactly as dropping files on the
 * campaign page does: log the campaign's next shot with the last shot's set-up, upload the files to it, and wait
 * for the result.
 */
import { nextShotBody, type ShotSetUp } from '../../../shared/contracts/shots.ts';
import { formatMeasurement } from '../../../shared/units/format-measurement.ts';
import { ApiError, type BenchApi, type UploadFile } from './api-client.ts';

interface Membership { labId: string; labName: string; labSlug: string }
interface CampaignRow { id: string; name: string }
interface ShotRow extends ShotSetUp { id: string; number: number }

export interface CampaignRef { labId: string; labName: string; campaignId: string; campaignName: string }

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Finds a campaign by id or by name (case-insensitive) in the token owner's labs, or in the one `lab` names. */
export async function resolveCampaign(api: BenchApi, campaign: string, lab?: string): Promise<CampaignRef> {
  const me = await api.get<{ memberships: Membership[] }>('/api/auth/me');
  const labs = lab
    ? me.memberships.filter((m) => [m.labId, m.labSlug, m.labName.toLowerCase()].includes(lab.toLowerCase()) || m.labId === lab)
    : me.memberships;
  if (labs.length === 0) throw new ApiError(404, lab ? `you are not a member of a lab "${lab}"` : 'this token\'s owner belongs to no lab');
  const found: CampaignRef[] = [];
  for (const m of labs) {
    const { campaigns } = await api.get<{ campaigns: CampaignRow[] }>(`/api/labs/${m.labId}/campaigns`);
    for (const c of campaigns) {
      if ((UUID.test(campaign) && c.id === campaign.toLowerCase()) || c.name.toLowerCase() === campaign.toLowerCase()) {
        found.push({ labId: m.labId, labName: m.labName, campaignId: c.id, campaignName: c.name });
      }
    }
  }
  if (found.length === 0) throw new ApiError(404, `no campaign "${campaign}" in ${labs.map((l) => l.labName).join(', ')}`);
  if (found.length > 1) throw new ApiError(409, `"${campaign}" names a campaign in several labs (${found.map((f) => f.labName).join(', ')}); add --lab`);
  return found[0];
}

/** The note of a shot the uploader logged; the marker lets a retried request find the shot it already made. */
export const shotNote = (group: string, names: string[]) =>
  `Logged by the bench uploader from ${names.join(', ')} [bench ${group}]; check the conditions.`;

/**
 * Logs the campaign's next shot with the last shot's projectile, rig, seal and room conditions. If a shot with this
 * group's marker exists already (the answer to an earlier attempt was lost), that shot is returned instead.
 */
export async function logNextShot(api: BenchApi, ref: CampaignRef, group: string, names: string[]): Promise<{ id: string; number: number }> {
  const base = `/api/labs/${ref.labId}/shots?campaignId=${ref.campaignId}`;
  const earlier = await api.get<{ shots: ShotRow[] }>(`${base}&q=${encodeURIComponent(`[bench ${group}]`)}&limit=1`);
  if (earlier.shots[0]) return earlier.shots[0];
  const latest = (await api.get<{ shots: ShotRow[] }>(`${base}&limit=1&sort=number:desc`)).shots[0];
  const { shot } = await api.post<{ shot: { id: string; number: number } }>(
    `/api/labs/${ref.labId}/shots`,
    nextShotBody(ref.campaignId, latest, shotNote(group, names), new Date().toISOString()),
  );
  return shot;
}

export async function uploadFiles(api: BenchApi, shotId: string, files: UploadFile[]): Promise<{ captures: { sha256: string; fileName: string; duplicate: boolean }[] }> {
  return api.upload(shotId, files);
}

interface ShotDetail {
  shot: { id: string; number: number; status: string; currentAnalysisId: string | null };
  captures: { fileName: string; state: string; error: string | null }[];
  analyses: { id: string; version: number; state: string; error: string | null }[];
  currentAnalysis: { id: string; results: { speed: { value: number; uncertainty: number; method: string; basis: string } | null; warnings: string[] } | null } | null;
}

export interface ShotOutcome {
  number: number;
  speed: { value: number; uncertainty: number; method: string; basis: string } | null;
  warnings: string[];
  /** Why there is no speed: a file that could not be read, an analysis that failed, no usable pulse. */
  failure: string | null;
}

/** The outcome once nothing is being read or computed any more; undefined while work is under way. */
export function outcomeOf(d: ShotDetail): ShotOutcome | undefined {
  if (d.captures.some((c) => c.state === 'queued' || c.state === 'reading')) return undefined;
  const failedFiles = d.captures.filter((c) => c.state === 'failed').map((c) => `${c.fileName}: ${c.error ?? 'could not be read'}`);
  if (d.captures.length > 0 && failedFiles.length === d.captures.length) {
    return { number: d.shot.number, speed: null, warnings: [], failure: failedFiles.join('; ') };
  }
  const newest = d.analyses[0];
  if (!newest || newest.state === 'queued' || newest.state === 'running') return undefined;
  if (newest.state === 'failed') {
    return { number: d.shot.number, speed: null, warnings: [], failure: [...failedFiles, `analysis: ${newest.error ?? 'failed'}`].join('; ') };
  }
  // The worker moves the shot's pointer in the same transaction that finishes the version: wait for it.
  if (d.currentAnalysis?.id !== newest.id) return undefined;
  const results = d.currentAnalysis.results;
  const speed = results?.speed ?? null;
  return {
    number: d.shot.number,
    speed,
    warnings: results?.warnings ?? [],
    failure: speed ? (failedFiles.length > 0 ? failedFiles.join('; ') : null) : 'no gate gave a usable pulse',
  };
}

export async function readOutcome(api: BenchApi, shotId: string): Promise<ShotOutcome | undefined> {
  return outcomeOf(await api.get<ShotDetail>(`/api/shots/${shotId}`));
}

const METHOD_WORDS: Record<string, string> = { fit: 'time of flight, fit over the gates', pair: 'time of flight, two gates', occlusion: 'occlusion, one gate' };

/** One line per shot: "shot #12  2 files (a.csv, b.csv)  312.41 ± 0.52 m/s (k = 2), time of flight, two gates". */
export function formatShotLine(outcome: ShotOutcome, names: string[]): string {
  const files = `${names.length} file${names.length === 1 ? '' : 's'} (${names.join(', ')})`;
  const head = `shot #${outcome.number}  ${files}`;
  if (!outcome.speed) return `${head}  failed: ${outcome.failure ?? 'no result'}`;
  const s = outcome.speed;
  const warn = outcome.warnings.length > 0 ? `; ${outcome.warnings.length} warning${outcome.warnings.length === 1 ? '' : 's'}: check before trusting` : '';
  return `${head}  ${formatMeasurement(s.value, s.uncertainty, 'm/s')} (k = 2), ${METHOD_WORDS[s.basis] ?? s.method}${warn}`;
}
