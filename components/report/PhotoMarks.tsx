/**
 * The overlay on the photo (image px, origin top-left, +y down): the reference square's outline and corners,
 * every detection marked by the verdict of the position it was matched to, the unmatched ones, and the places
 * where expected positions were not seen. Sizes are given in screen px through `pxPerScreen`.
 */
import type { Points } from '@/lib/geometry/contract';
import type { Mark } from '@/lib/report/palette';
import { MarkShape } from './Mark';

export interface PhotoMark { key: string; x: number; y: number; mark: Mark; title: string; diameterPx?: number }

export function PhotoMarks({ corners, marks, pxPerScreen, showSquare = true }: { corners: Points['reference']['corners'] | null; marks: PhotoMark[]; pxPerScreen: number; showSquare?: boolean }) {
  const r = 7 * pxPerScreen;
  return (
    <g>
      {showSquare && corners && (
        <polygon points={corners.map((c) => c.join(',')).join(' ')} fill="none" stroke="#ffd23f" strokeWidth={3 * pxPerScreen} strokeDasharray={`${10 * pxPerScreen} ${6 * pxPerScreen}`} />
      )}
      {marks.map((m) => (
        <g key={m.key} data-mark={m.mark}>
          <title>{m.title}</title>
          <circle cx={m.x} cy={m.y} r={Math.max(r * 1.5, (m.diameterPx ?? 0) / 2)} fill="none" stroke="#000" strokeOpacity={0.55} strokeWidth={3.5 * pxPerScreen} />
          <g style={{ ['--map-ground' as string]: '#000' }}>
            <MarkShape mark={m.mark} x={m.x} y={m.y} r={r} />
          </g>
        </g>
      ))}
    </g>
  );
}
