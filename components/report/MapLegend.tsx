/**
 * What a deviation map's marks and arrows mean, above the map on the report page and the shared page: the view's
 * meaning (when the report has a hole-to-hole view), each mark with its count in that view, and the arrow scale.
 */
import type { Report } from '@/lib/geometry/contract';
import { POSITION_MARKS } from '@/lib/report/palette';
import { arrowScaleWords, MAP_VIEW_MEANING, MAP_VIEW_WORD, viewCounts, type MapView } from '@/lib/report/words';
import { MarkChip } from './Mark';

export function MapLegend({ report, view, formView, exaggeration }: {
  report: Pick<Report, 'positions' | 'unmatched'>;
  /** The view shown. */
  view: MapView;
  /** Whether the report has a hole-to-hole view to switch to (lib/report/words.ts hasFormView). */
  formView: boolean;
  /** Arrow length per mm of deviation (lib/report/map-scale.ts). */
  exaggeration: number;
}) {
  const counts = viewCounts(report, view);
  return (
    <>
      {formView && <p className="text-sm text-muted" data-testid="map-view-meaning">{MAP_VIEW_WORD[view]}: {MAP_VIEW_MEANING[view]}.</p>}
      <div className="flex flex-wrap gap-x-4 gap-y-1" aria-label="Legend">
        {POSITION_MARKS.map((m) => <MarkChip key={m} mark={m} count={counts[m]} />)}
        <span data-testid="arrow-scale">{arrowScaleWords(exaggeration)}</span>
      </div>
    </>
  );
}
