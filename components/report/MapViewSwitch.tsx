'use client';
/** Switches a deviation map between the whole bed (rigid placement) and hole to hole (form), lib/report/words.ts. */
import { MAP_VIEW_MEANING, MAP_VIEW_WORD, MAP_VIEWS, type MapView } from '@/lib/report/words';

export function MapViewSwitch({ value, onChange, className = '' }: { value: MapView; onChange: (v: MapView) => void; className?: string }) {
  return (
    <fieldset className={`flex flex-col gap-1 ${className}`} data-testid="map-view">
      <legend className="text-sm">Deviations shown</legend>
      <div className="flex gap-2">
        {MAP_VIEWS.map((v) => (
          <button key={v} type="button" className={`btn ${value === v ? '' : 'btn-quiet'}`} aria-pressed={value === v} title={MAP_VIEW_MEANING[v]} data-view={v} onClick={() => onChange(v)}>{MAP_VIEW_WORD[v]}</button>
        ))}
      </div>
    </fieldset>
  );
}
