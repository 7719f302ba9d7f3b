/**
 * What lies over or in a rendered bed, by bed point: the target's sheet, objects laid on the bed, T-track channels.
 * Bed frame: mm, origin front-left, +X right, +Y away.
 */
import type { Pattern } from '@/lib/geometry/contract';
import type { SceneOptions } from './scene';
import { sheetLookup, type SceneTarget } from './scene-target';

type Occluder = NonNullable<SceneOptions['occluders']>[number];
type Channel = NonNullable<Pattern['channels']>[number];

export interface BedCover {
  occluders: Occluder[];
  channels: Channel[];
  /** The object lying over bed point (X, Y) mm, if any (the first listed). */
  occluderAt: (X: number, Y: number) => Occluder | undefined;
  /** The point in the square frame (mm) of the sheet over (X, Y) mm, or null off the sheet. */
  sheetAt: (X: number, Y: number) => [number, number] | null;
  /** Index of the channel containing (X, Y) mm, or −1. */
  channelAt: (X: number, Y: number) => number;
}

const inRect = (X: number, Y: number, r: { x: number; y: number; width: number; height: number }) => X >= r.x && X <= r.x + r.width && Y >= r.y && Y <= r.y + r.height;

/** The cover lookups for the pattern's channels, the options' occluders and the placed target's sheet. */
export function bedCover(pattern: Pattern, opts: Pick<SceneOptions, 'occluders'>, target: SceneTarget): BedCover {
  const occluders = opts.occluders ?? [];
  const channels = pattern.channels ?? [];
  return {
    occluders,
    channels,
    occluderAt: (X, Y) => occluders.find((o) => inRect(X, Y, o)),
    sheetAt: sheetLookup(target),
    channelAt: (X, Y) => {
      for (let i = 0; i < channels.length; i++) if (inRect(X, Y, channels[i]!)) return i;
      return -1;
    },
  };
}
