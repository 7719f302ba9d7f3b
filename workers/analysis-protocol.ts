/**
 * The messages between the worker (parent) and its analysis process (workers/analysis-child.ts), sent over
 * Node's IPC channel with `serialization: 'advanced'` (structured clone: a Buffer arrives as a Uint8Array,
 * NaN and nested objects survive). One request at a time per child; each carries an `id` echoed by every
 * message about it.
 */
import type { MeasuredDistance, Pattern, PhotoQuality, Points, Report } from '@/lib/geometry/contract';
import type { Corners } from '@/lib/checks/intake';

/** Test-only misbehaviour of the child (honoured only when NODE_ENV is not 'production'). */
export type TestHog = 'heap' | 'native' | 'spin' | 'crash';

export type ParentMessage =
  | { type: 'detect'; id: number; bytes: Uint8Array; pattern: Pattern; referenceMm: number; corners: Corners | null; wantsQuality: boolean; hog?: TestHog }
  | { type: 'analyze'; id: number; points: Points; pattern: Pattern; distances?: MeasuredDistance[]; hog?: TestHog }
  | { type: 'quality-stored'; id: number };

/** An error thrown in the child, as data: its class name, message, and whether it is the caller's input. */
export interface SerialError { name: string; message: string; inputError: boolean }

export type ChildMessage =
  | { type: 'ready'; ms: number }
  | { type: 'stage'; id: number; name: string; fraction?: number }
  | { type: 'quality'; id: number; quality: PhotoQuality }
  | { type: 'result'; id: number; value: Points | Report; maxRssKb: number }
  | { type: 'error'; id: number; error: SerialError; maxRssKb: number };
