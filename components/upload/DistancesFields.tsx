'use client';
/**
 * The upload form's optional field group: measured distances between two positions (a steel tape between hole
 * centres, or the machine's coordinates with the spindle jogged over both holes). They set the bed's overall size
 * far better than a small reference square can; see the photo guide. State lives in the form (./UploadForm.tsx).
 */
import { useId } from 'react';
import { EMPTY_DISTANCE_ROW, type DistanceRow } from './distances';

export function DistancesFields({ rows, units, error, disabled, onChange, onUnits }: {
  rows: DistanceRow[]; units: 'mm' | 'in'; error?: string; disabled?: boolean;
  onChange: (rows: DistanceRow[]) => void; onUnits: (u: 'mm' | 'in') => void;
}) {
  const id = useId();
  const set = (i: number, patch: Partial<DistanceRow>) => onChange(rows.map((r, k) => (k === i ? { ...r, ...patch } : r)));
  return (
    <details className="flex flex-col gap-3" open={rows.some((r) => r.from || r.to || r.length) || !!error} data-testid="distances">
      <summary className="cursor-pointer font-bold">Measured distances <span className="font-normal text-muted">(optional, for the overall size)</span></summary>
      <p className="text-sm text-muted">
        A length you measured between two hole centres, with labels as the report writes them (e.g. insert A1 to insert R12).
        Measure between holes far apart, along the bed and across it. The ± is one standard deviation: about 0.3 mm for a
        steel tape read with care over 2 m, about 0.1 mm for the machine&apos;s own coordinates with the spindle centred over
        each hole by eye. Machine stopped while you reach onto the bed.
      </p>
      <div className="field w-40">
        <label htmlFor={`${id}-u`}>Unit</label>
        <select id={`${id}-u`} className="input" value={units} disabled={disabled} onChange={(e) => onUnits(e.target.value as 'mm' | 'in')}>
          <option value="mm">mm</option>
          <option value="in">in</option>
        </select>
      </div>
      {rows.map((r, i) => (
        <fieldset key={i} className="flex flex-wrap items-end gap-2" aria-label={`Distance ${i + 1}`}>
          <div className="field w-36"><label htmlFor={`${id}-${i}-f`}>From</label><input id={`${id}-${i}-f`} className="input" placeholder="insert A1" value={r.from} disabled={disabled} onChange={(e) => set(i, { from: e.target.value })} data-testid={`distance-${i}-from`} /></div>
          <div className="field w-36"><label htmlFor={`${id}-${i}-t`}>To</label><input id={`${id}-${i}-t`} className="input" placeholder="insert R12" value={r.to} disabled={disabled} onChange={(e) => set(i, { to: e.target.value })} data-testid={`distance-${i}-to`} /></div>
          <div className="field w-32"><label htmlFor={`${id}-${i}-l`}>Distance ({units})</label><input id={`${id}-${i}-l`} className="input font-mono" inputMode="decimal" value={r.length} disabled={disabled} onChange={(e) => set(i, { length: e.target.value })} data-testid={`distance-${i}-length`} /></div>
          <div className="field w-28"><label htmlFor={`${id}-${i}-s`}>± ({units})</label><input id={`${id}-${i}-s`} className="input font-mono" inputMode="decimal" value={r.sigma} disabled={disabled} onChange={(e) => set(i, { sigma: e.target.value })} data-testid={`distance-${i}-sigma`} /></div>
          <button type="button" className="btn btn-quiet" disabled={disabled} onClick={() => onChange(rows.length > 1 ? rows.filter((_, k) => k !== i) : [EMPTY_DISTANCE_ROW])}>Remove</button>
        </fieldset>
      ))}
      <div><button type="button" className="btn btn-quiet" disabled={disabled || rows.length >= 50} onClick={() => onChange([...rows, EMPTY_DISTANCE_ROW])}>Add a distance</button></div>
      {error && <span role="alert" className="field-error">{error}</span>}
    </details>
  );
}
