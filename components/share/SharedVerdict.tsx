/**
 * The top of a shared report: bed, check, when, the verdict box, the photo's problems if it had any, and the figure
 * cards, the same as the report page's (components/report/VerdictBox.tsx). Pure (no state, no browser API), so the shared page renders it on
 * the server: it is there at first paint, with or without JavaScript, while the map and tables load. Times in
 * UTC so server and browser write the same text.
 */
import { PhotoNote } from '@/components/report/PhotoNote';
import { FigureCards, VerdictBox } from '@/components/report/VerdictBox';
import type { Report } from '@/lib/geometry/contract';
import type { LengthUnit } from '@/lib/report/units';
import { formatUtc } from '@/lib/dates';

export interface SharedVerdictProps {
  bedName: string;
  checkTitle: string | null;
  /** When the check finished, ms since the epoch. */
  checkedAt: number | null;
  report: Report;
  unit: LengthUnit;
  /** The photo's problems in words (the share service's photoNote), or null. */
  photoNote?: string | null;
}

export function SharedVerdict({ bedName, checkTitle, checkedAt, report, unit, photoNote }: SharedVerdictProps) {
  const when = checkedAt ? formatUtc(checkedAt) : null;
  return (
    <>
      <VerdictBox report={report} unit={unit} heading="h1" title={`${bedName}${checkTitle ? ` · ${checkTitle}` : ''}${when ? ` · ${when}` : ''}`} />
      <PhotoNote note={photoNote ?? null} />
      <FigureCards report={report} unit={unit} />
    </>
  );
}
