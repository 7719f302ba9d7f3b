'use client';
/**
 * The checks the browser makes at once on a chosen photo, before it is sent: its size from decoding it
 * (createImageBitmap, or an <img> where that fails), its type, and its EXIF orientation and focal length (exifr,
 * bundled with the page). Words from ./photo-checks.ts.
 */
import { useEffect, useState } from 'react';
import { photoChecks, type BedSize, type PhotoFacts } from './photo-checks';

async function decodedSize(file: File): Promise<{ width: number; height: number } | null> {
  try {
    // EXIF orientation applied, as the photo is shown and measured
    const bmp = await createImageBitmap(file, { imageOrientation: 'from-image' });
    const s = { width: bmp.width, height: bmp.height };
    bmp.close();
    return s;
  } catch {
    const url = URL.createObjectURL(file);
    try {
      const img = new Image();
      img.src = url;
      await img.decode();
      return { width: img.naturalWidth, height: img.naturalHeight };
    } catch {
      return null;
    } finally {
      URL.revokeObjectURL(url);
    }
  }
}

async function exifFacts(file: File): Promise<Pick<PhotoFacts, 'orientation' | 'focalMm' | 'focal35mm'>> {
  try {
    const { default: exifr } = await import('exifr');
    const t = (await exifr.parse(file, { pick: ['Orientation', 'FocalLength', 'FocalLengthIn35mmFormat'], translateValues: false, reviveValues: true })) as Record<string, unknown> | undefined;
    const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : null);
    return { orientation: num(t?.Orientation), focalMm: num(t?.FocalLength), focal35mm: num(t?.FocalLengthIn35mmFormat) };
  } catch {
    return { orientation: null, focalMm: null, focal35mm: null };
  }
}

/** Reads the facts of `file` in the browser. */
export async function readPhotoFacts(file: File): Promise<PhotoFacts> {
  const [size, exif] = await Promise.all([decodedSize(file), exifFacts(file)]);
  return { type: file.type, name: file.name, width: size?.width ?? null, height: size?.height ?? null, ...exif };
}

const TONE = { ok: 'text-pass', note: 'text-ink', warn: 'text-warn font-bold' } as const;
const MARK = { ok: '✓', note: 'i', warn: '!' } as const;

export function PhotoPrecheck({ file, bed }: { file: File; bed: BedSize | null }) {
  const [facts, setFacts] = useState<{ file: File; facts: PhotoFacts } | null>(null);
  useEffect(() => {
    let live = true;
    void readPhotoFacts(file).then((f) => { if (live) setFacts({ file, facts: f }); });
    return () => { live = false; };
  }, [file]);
  const current = facts?.file === file ? facts.facts : null;
  if (!current) return <p className="text-sm text-muted" data-testid="photo-precheck" data-state="reading">Reading the photo…</p>;
  const checks = photoChecks(current, bed);
  return (
    <section className="flex flex-col gap-2 rounded-lg border-2 border-line p-3" data-testid="photo-precheck" data-state="done" aria-label="Checked in your browser">
      <h3 className="font-bold">Checked here before sending</h3>
      <ul className="flex flex-col gap-1">
        {checks.map((c) => (
          <li key={c.code} className={`flex gap-2 ${TONE[c.level]}`} data-check={c.code} data-level={c.level}>
            <span aria-hidden="true" className="w-4 shrink-0 text-center font-mono font-bold">{MARK[c.level]}</span>
            <span>{c.text}</span>
          </li>
        ))}
      </ul>
      <p className="text-sm text-muted">After the upload the server measures sharpness, exposure, the square and the tilt, and says what the photo can judge before the full result.</p>
    </section>
  );
}
