import { useEffect, useState } from 'react';
import { SHOT_STATUS, shotStatus } from '../../../lib/shot-status.ts';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { Badge, Button, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatCelsius, formatDateTime, formatKpa, formatMeasurement, formatDate } from '../../../lib/format.ts';
import { SHOT_SORT_FIELDS, useShotList, type ShotListParams, type ShotListRow, type ShotSortField, type SortDirection } from '../api/shot-list.ts';

export const PAGE_SIZE = 25;


/** How the speed was obtained, in a few words. */
function methodLabel(speed: NonNullable<ShotListRow['speed']>): string {
  if (speed.method === 'occlusion' || speed.basis === 'occlusion') return 'occlusion, one gate';
  if (speed.basis === 'fit') return 'time of flight, fit';
  if (speed.basis === 'pair') return 'time of flight, two gates';
  return speed.method === 'flight' ? 'time of flight' : (speed.method ?? '');
}

/** The review decision in the words of the status badges (src/lib/shot-status.ts): signed off, returned. */
const decisionWord = (d: NonNullable<ShotListRow['review']>['decision']) => (d === 'approved' ? 'Signed off' : 'Returned');
const reviewWords = (r: NonNullable<ShotListRow['review']>) => `${decisionWord(r.decision)} ${formatDate(r.decidedAt)}`;
/** The compare page shows two to four shots. */
const MAX_COMPARE = 4;

/** Words for each order in the narrow-screen sort menu: [ascending, descending]. */
const SORT_CHOICES: Record<ShotSortField, [string, string]> = {
  number: ['Shot number, first shot first', 'Shot number, latest first'],
  firedAt: ['Time fired, oldest first', 'Time fired, newest first'],
  tubePressure: ['Tube pressure, best vacuum first', 'Tube pressure, highest first'],
  speed: ['Speed, slowest first', 'Speed, fastest first'],
  status: ['Status, awaiting files first', 'Status, signed off first'],
};

/** First click on a column: latest shots and fastest speeds on top, the best vacuum on top, statuses in workflow order. */
const FIRST_DIRECTION: Record<ShotSortField, SortDirection> = { number: 'desc', firedAt: 'desc', tubePressure: 'asc', speed: 'desc', status: 'asc' };

/** Sort, filter, search and page live in the address, so a view can be bookmarked or sent to a colleague. */
export function useShotTableParams(campaignId: string) {
  const [search, setSearch] = useSearchParams();
  const sortParam = search.get('sort') as ShotSortField | null;
  const sort: ShotSortField = sortParam && (SHOT_SORT_FIELDS as readonly string[]).includes(sortParam) ? sortParam : 'number';
  const direction: SortDirection = search.get('dir') === 'asc' ? 'asc' : search.get('dir') === 'desc' ? 'desc' : FIRST_DIRECTION[sort];
  const page = Math.max(1, Number.parseInt(search.get('page') ?? '1', 10) || 1);
  const params: ShotListParams = {
    campaignId, sort, direction, status: search.get('status') ?? '', q: search.get('q') ?? '', limit: PAGE_SIZE, offset: (page - 1) * PAGE_SIZE,
  };
  const update = (changes: Record<string, string | null>, resetPage = true) => {
    const next = new URLSearchParams(search);
    for (const [k, v] of Object.entries(changes)) {
      if (v === null || v === '') next.delete(k);
      else next.set(k, v);
    }
    if (resetPage) next.delete('page');
    setSearch(next, { replace: true });
  };
  return { params, page, update };
}

function SortHeader({ field, label, params, onSort, align = 'left', className = '' }: {
  field: ShotSortField; label: string; params: ShotListParams; onSort: (f: ShotSortField) => void; align?: 'left' | 'right'; className?: string;
}) {
  const active = params.sort === field;
  const arrow = active ? (params.direction === 'asc' ? '▲' : '▼') : '↕';
  return (
    <th scope="col" aria-sort={active ? (params.direction === 'asc' ? 'ascending' : 'descending') : 'none'} className={`px-3 py-2 font-medium ${align === 'right' ? 'text-right' : ''} ${className}`}>
      <button
        type="button"
        onClick={() => onSort(field)}
        className={`inline-flex items-center gap-1 rounded uppercase tracking-wide hover:text-harbour-800 focus-visible:outline-2 focus-visible:outline-signal-400 ${active ? 'text-harbour-800' : ''}`}
      >
        {label}
        <span aria-hidden className={`text-[10px] ${active ? 'text-signal-600' : 'text-harbour-300'}`}>{arrow}</span>
      </button>
    </th>
  );
}

function SearchBox({ value, onChange }: { value: string; onChange: (q: string) => void }) {
  const [text, setText] = useState(value);
  const [seen, setSeen] = useState(value);
  const [sent, setSent] = useState(value);
  // The address changed from outside the box (Clear, back button): show that, unless it is what the box just sent
  // (the person may have typed on since).
  if (value !== seen) {
    setSeen(value);
    if (value !== sent) {
      setText(value);
      setSent(value);
    }
  }
  // A request per keystroke would refetch the table while the person is still typing.
  useEffect(() => {
    if (text === sent) return;
    const t = setTimeout(() => {
      setSent(text);
      onChange(text);
    }, 300);
    return () => clearTimeout(t);
  }, [text, sent, onChange]);
  return (
    <input
      type="search"
      aria-label="Search notes and seal type"
      placeholder="Search notes and seal type"
      value={text}
      onChange={(e) => setText(e.target.value)}
      className="block w-full rounded-md border-0 bg-white px-3 py-2 text-sm ring-1 ring-harbour-200 placeholder:text-harbour-300 focus:ring-2 focus:ring-harbour-600 sm:w-72"
    />
  );
}

export function ShotTable({ labId, campaignId, canWrite }: { labId: string; campaignId: string; canWrite: boolean }) {
  const navigate = useNavigate();
  const { params, page, update } = useShotTableParams(campaignId);
  const list = useShotList(labId, params);
  const clear = () => update({ q: null, status: null });
  const filtered = params.q !== '' || params.status !== '';
  const onSort = (field: ShotSortField) =>
    update({ sort: field, dir: params.sort === field ? (params.direction === 'asc' ? 'desc' : 'asc') : FIRST_DIRECTION[field] });
  const shotUrl = (id: string) => `/labs/${labId}/shots/${id}`;
  const total = list.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const [picked, setPicked] = useState<{ id: string; number: number }[]>([]);
  const isPicked = (id: string) => picked.some((p) => p.id === id);
  const toggle = (row: ShotListRow) =>
    setPicked((p) => (p.some((x) => x.id === row.id) ? p.filter((x) => x.id !== row.id) : p.length < MAX_COMPARE ? [...p, { id: row.id, number: row.number }] : p));

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center gap-3 text-sm" data-testid="compare-picker">
        <Button variant="secondary" disabled={picked.length < 2} onClick={() => navigate(`/labs/${labId}/compare?shots=${picked.map((p) => p.id).join(',')}`)}>
          Compare {picked.length >= 2 ? `${picked.length} shots` : 'shots'}
        </Button>
        <span className="text-harbour-500">
          {picked.length < 2 ? 'Tick two to four shots to see them side by side.' : `Shots ${picked.map((p) => `#${p.number}`).join(', ')} ticked (at most ${MAX_COMPARE}).`}
        </span>
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <SearchBox value={params.q} onChange={(q) => update({ q })} />
        <select
          aria-label="Status"
          value={params.status}
          onChange={(e) => update({ status: e.target.value })}
          className="block rounded-md border-0 bg-white px-3 py-2 text-sm ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600"
        >
          <option value="">Every status</option>
          {Object.entries(SHOT_STATUS).map(([value, s]) => <option key={value} value={value}>{s.label}</option>)}
        </select>
        {/* Narrow screens hide some column headers; the order can still be chosen here. */}
        <select
          aria-label="Sort by"
          value={`${params.sort}:${params.direction}`}
          onChange={(e) => {
            const [sort, dir] = e.target.value.split(':');
            update({ sort, dir });
          }}
          className="block rounded-md border-0 bg-white px-3 py-2 text-sm ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600 lg:hidden"
        >
          {SHOT_SORT_FIELDS.flatMap((f) => (['desc', 'asc'] as const).map((d) => (
            <option key={`${f}:${d}`} value={`${f}:${d}`}>{SORT_CHOICES[f][d === 'asc' ? 0 : 1]}</option>
          )))}
        </select>
        {filtered && <Button variant="ghost" onClick={clear}>Clear</Button>}
        {list.isFetching && !list.isPending && <span role="status" className="text-xs text-harbour-500">Updating…</span>}
      </div>

      {list.isPending && <Loading what="Loading the shots" />}
      {list.isError && <ErrorNote error={list.error} />}
      {list.data && list.data.shots.length === 0 && total > 0 && (
        <EmptyState title={`Page ${page} is past the last one`}>
          <Button variant="secondary" className="mt-3" onClick={() => update({})}>Go to the first page</Button>
        </EmptyState>
      )}
      {list.data && list.data.shots.length === 0 && total === 0 && (
        filtered ? (
          <EmptyState title={params.q ? `No shots match “${params.q}”${params.status ? ' with that status' : ''}` : 'No shots with that status'}>
            <p>Search looks in each shot's notes and seal type.</p>
            <Button variant="secondary" className="mt-3" onClick={clear}>Clear the search and filter</Button>
          </EmptyState>
        ) : (
          <EmptyState title="No shots in this campaign yet">
            {canWrite
              ? 'Log the first one with “New shot”; then drop its scope files on the shot’s page.'
              : 'Shots appear here as experimenters log them.'}
          </EmptyState>
        )
      )}
      {list.data && list.data.shots.length > 0 && (
        <>
          <div className="-mx-5 overflow-x-auto">
            <table className="min-w-full text-sm" aria-label="Shots">
              <thead className="text-left text-xs uppercase tracking-wide text-harbour-500">
                <tr>
                  <th scope="col" className="w-8 py-2 pl-5"><span className="sr-only">Compare</span></th>
                  <SortHeader field="number" label="Shot" params={params} onSort={onSort} className="pl-2" />
                  <SortHeader field="firedAt" label="Fired" params={params} onSort={onSort} className="hidden lg:table-cell" />
                  <SortHeader field="tubePressure" label="Tube" params={params} onSort={onSort} align="right" />
                  <th scope="col" className="hidden px-3 py-2 font-medium lg:table-cell">Seal · ambient</th>
                  <SortHeader field="speed" label="Speed ± U" params={params} onSort={onSort} align="right" />
                  <SortHeader field="status" label="Status" params={params} onSort={onSort} />
                  <th scope="col" className="hidden px-3 py-2 pr-5 font-medium lg:table-cell">Review</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-harbour-100">
                {list.data.shots.map((s) => {
                  const status = shotStatus(s.status);
                  const missing = s.missingConditions ?? [];
                  return (
                    <tr key={s.id} onClick={() => navigate(shotUrl(s.id))} className="cursor-pointer align-top hover:bg-harbour-50">
                      <td className="py-2 pl-5" onClick={(e) => e.stopPropagation()}>
                        <input
                          type="checkbox"
                          aria-label={`Compare shot ${s.number}`}
                          checked={isPicked(s.id)}
                          disabled={!isPicked(s.id) && picked.length >= MAX_COMPARE}
                          onChange={() => toggle(s)}
                          className="h-4 w-4 accent-harbour-700"
                        />
                      </td>
                      <td className="py-2 pr-3 pl-2 font-medium tabular-nums">
                        <Link to={shotUrl(s.id)} onClick={(e) => e.stopPropagation()} className="text-harbour-800 hover:underline">#{s.number}</Link>
                        {/* Below 1024 px the narrower columns fold into their neighbours instead of scrolling sideways. */}
                        <span className="block text-xs font-normal text-harbour-500 lg:hidden">{formatDateTime(s.firedAt)}</span>
                      </td>
                      <td className="hidden px-3 py-2 whitespace-nowrap tabular-nums text-harbour-700 lg:table-cell">{formatDateTime(s.firedAt)}</td>
                      <td className="px-3 py-2 text-right tabular-nums">
                        <span className="block whitespace-nowrap">{formatKpa(s.conditions.tubePressurePa)}</span>
                        <span className="block text-xs text-harbour-600 lg:hidden">{s.conditions.sealType}</span>
                      </td>
                      <td className="hidden px-3 py-2 text-harbour-700 lg:table-cell">
                        <span className="block">{s.conditions.sealType || '—'}</span>
                        {(s.conditions.ambientTemperatureK != null || s.conditions.ambientPressurePa != null) && (
                          <span className="block text-xs tabular-nums text-harbour-500">
                            {formatCelsius(s.conditions.ambientTemperatureK)} · {formatKpa(s.conditions.ambientPressurePa, 4)}
                          </span>
                        )}
                      </td>
                      <td className="px-3 py-2 text-right tabular-nums">
                        {s.speed ? (
                          <>
                            <span className="block font-medium whitespace-nowrap text-harbour-900">{formatMeasurement(s.speed.value, s.speed.uncertainty, 'm/s')}</span>
                            <span className="block text-xs text-harbour-500">{methodLabel(s.speed)}{s.speed.uncertainty != null && ', k = 2'}</span>
                          </>
                        ) : <span className="text-harbour-300">—</span>}
                      </td>
                      <td className="px-3 py-2 pr-5 lg:pr-3">
                        <Badge tone={status.tone}>{status.label}</Badge>
                        {missing.length > 0 && (
                          <span className="mt-1 block text-xs whitespace-nowrap text-signal-800" title={`Missing: ${missing.join(', ')}`} data-testid="conditions-missing">conditions missing</span>
                        )}
                        {s.review && <span className="mt-1 block text-xs whitespace-nowrap text-harbour-500 lg:hidden">{reviewWords(s.review)}</span>}
                      </td>
                      <td className="hidden px-3 py-2 pr-5 whitespace-nowrap lg:table-cell">
                        {s.review ? (
                          <>
                            <Badge tone={s.review.decision === 'approved' ? 'good' : 'bad'}>{decisionWord(s.review.decision)}</Badge>
                            <span className="block text-xs text-harbour-500">{formatDate(s.review.decidedAt)}</span>
                          </>
                        ) : <span className="text-harbour-300">—</span>}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
          <nav aria-label="Pages" className="flex flex-wrap items-center justify-between gap-3 text-sm text-harbour-600">
            <span className="tabular-nums">
              Shots {params.offset + 1}–{params.offset + list.data.shots.length} of {total}
            </span>
            <span className="flex items-center gap-2">
              <Button variant="secondary" disabled={page <= 1} onClick={() => update({ page: String(page - 1) }, false)}>Previous</Button>
              <span className="tabular-nums">Page {page} of {pages}</span>
              <Button variant="secondary" disabled={page >= pages} onClick={() => update({ page: String(page + 1) }, false)}>Next</Button>
            </span>
          </nav>
        </>
      )}
    </div>
  );
}
