/**
 * What to do about each issue of the photo-quality stage (lib/vision/quality.ts), in the words the verdict, the CLI
 * and the photo guide use. Pure (no image code), so the guide page can show it.
 */
import type { PhotoIssueCode } from '@/lib/geometry/contract';

/** The advice for each issue code. */
export const ISSUE_ADVICE: Record<PhotoIssueCode, string> = {
  blurred: 'Tap the screen on the square to focus before you take the photo, and hold the phone still; in dim light, add light rather than waiting for a slower shot.',
  'motion-blur': 'Hold the phone still with both hands (or rest it on something) while the photo is taken, and add light so the shot is short.',
  overexposed: 'Switch off the flash or turn the square away from the lamp, and tap on the white paper to let the phone darken the shot.',
  underexposed: 'Add light over the bed, or tap on the bed to let the phone brighten the shot; keep the flash off.',
  'target-small': 'Step closer, or print the square larger, so that it spans more of the photo; the whole bed must still be in the frame.',
  'holes-small': 'Take the photo closer or in the camera\'s full resolution (not a messenger or screenshot copy); photograph a large bed in two halves if need be.',
  tilted: 'Hold the phone flat above the middle of the bed, looking straight down.',
  'target-cut': 'Move the square onto the bed, inside the frame with some bed around it, or step back until it is whole in the photo.',
  'bed-cut': 'Step back until the whole bed is in the frame.',
};
