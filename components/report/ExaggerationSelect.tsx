'use client';
/** The map's arrow exaggeration: automatic (from the deviations, see lib/report/map-scale) or a fixed factor. */
import { EXAGGERATIONS } from './BedMap';

export type Exaggeration = number | 'auto';

export function ExaggerationSelect({ value, autoFactor, onChange, className = 'field' }: { value: Exaggeration; autoFactor: number; onChange: (v: Exaggeration) => void; className?: string }) {
  return (
    <label className={className}>
      <span className="text-sm">Arrow exaggeration</span>
      <select className="input" value={String(value)} onChange={(e) => onChange(e.target.value === 'auto' ? 'auto' : Number(e.target.value))}>
        <option value="auto">Automatic (× {autoFactor.toLocaleString('en')})</option>
        {EXAGGERATIONS.map((x) => <option key={x} value={x}>× {x.toLocaleString('en')}</option>)}
      </select>
    </label>
  );
}
