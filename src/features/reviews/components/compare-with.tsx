import { useState } from 'react';
import { Link } from 'react-router-dom';

/** Up to three other shots of the campaign to open beside this one in the comparison (two to four shots in all). */
export function CompareWith({ labId, shotId, others }: { labId: string; shotId: string; others: { id: string; number: number }[] }) {
  const [picked, setPicked] = useState<string[]>([]);
  if (others.length === 0) return null;
  const toggle = (id: string) => setPicked((p) => (p.includes(id) ? p.filter((x) => x !== id) : p.length < 3 ? [...p, id] : p));
  return (
    <details className="text-xs">
      <summary className="cursor-pointer font-medium text-harbour-700">Compare with other shots</summary>
      <div className="mt-2 space-y-2">
        <div className="flex max-h-32 flex-wrap gap-x-3 gap-y-1 overflow-y-auto" role="group" aria-label="Shots to compare with">
          {others.map((s) => (
            <label key={s.id} className="inline-flex items-center gap-1">
              <input type="checkbox" className="h-3.5 w-3.5 accent-harbour-700" checked={picked.includes(s.id)} disabled={!picked.includes(s.id) && picked.length >= 3} onChange={() => toggle(s.id)} />
              #{s.number}
            </label>
          ))}
        </div>
        {picked.length === 0
          ? <p className="text-harbour-500">Tick one to three shots.</p>
          : <Link className="inline-block rounded-md bg-harbour-800 px-2.5 py-1 font-medium text-white hover:bg-harbour-700" to={`/labs/${labId}/compare?shots=${[shotId, ...picked].join(',')}`}>Compare {picked.length + 1} shots</Link>}
      </div>
    </details>
  );
}
