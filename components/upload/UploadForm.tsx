'use client';
/**
 * Upload one photo of the bed: drag and drop, click to choose, or the phone's back camera; a preview; the
 * browser's own checks of the photo (./PhotoPrecheck.tsx: size, type, EXIF orientation and focal length); the
 * reference square's measured side (mm or in) and the bed, checked with zod (./schema.ts); then a real
 * progress bar while XMLHttpRequest sends it to POST /api/beds/{bedId}/checks, and on to the check's page.
 */
import { useRouter } from 'next/navigation';
import Link from 'next/link';
import { useEffect, useId, useMemo, useRef, useState } from 'react';
import { useDropzone } from 'react-dropzone';
import { DistancesFields } from './DistancesFields';
import { PhotoPrecheck } from './PhotoPrecheck';
import type { BedSize } from './photo-checks';
import { EMPTY_DISTANCE_ROW, parseDistanceRows, type DistanceRow } from './distances';
import { photoProblem, REFERENCE_CHOICES, UploadFormSchema } from './schema';
import { xhrUpload, type UploadProgress, type XhrUpload } from './xhr';

type Units = 'mm' | 'in';
export interface UploadBed { id: string; name: string; hasPattern: boolean; size?: BedSize }

const ACCEPT = { 'image/jpeg': ['.jpg', '.jpeg'], 'image/png': ['.png'], 'image/webp': ['.webp'], 'image/heic': ['.heic', '.heif'], 'image/tiff': ['.tif', '.tiff'], 'image/avif': ['.avif'] };

const mb = (n: number) => `${(n / 1048576).toFixed(1)} MB`;

export function UploadForm({ beds, bedId: initialBed, userUnits, maxBytes }: { beds: UploadBed[]; bedId: string; userUnits: Units; maxBytes: number }) {
  const router = useRouter();
  const ids = { bed: useId(), size: useId(), units: useId(), title: useId() };
  const [file, setFile] = useState<File | null>(null);
  const [bedId, setBedId] = useState(initialBed);
  const [size, setSize] = useState(userUnits === 'in' ? '4' : '150');
  const [units, setUnits] = useState<Units>(userUnits);
  const [title, setTitle] = useState('');
  const [distanceRows, setDistanceRows] = useState<DistanceRow[]>([EMPTY_DISTANCE_ROW]);
  const [distanceUnits, setDistanceUnits] = useState<Units>(userUnits);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [progress, setProgress] = useState<UploadProgress | null>(null);
  const [phase, setPhase] = useState<'idle' | 'sending' | 'queued'>('idle');
  /** The check the server returned for a photo already checked with the same details (not measured again). */
  const [reused, setReused] = useState<string | null>(null);
  const upload = useRef<XhrUpload | null>(null);
  const cameraRef = useRef<HTMLInputElement>(null);

  const preview = useMemo(() => (file ? URL.createObjectURL(file) : null), [file]);
  useEffect(() => () => { if (preview) URL.revokeObjectURL(preview); }, [preview]);
  useEffect(() => () => upload.current?.abort(), []);

  const choose = (f: File | undefined) => {
    if (!f) return;
    setFile(f);
    setErrors((e) => { const { photo: _p, ...rest } = e; return rest; });
    setMessage(null);
    setReused(null);
  };

  const { getRootProps, getInputProps, isDragActive, fileRejections } = useDropzone({
    accept: ACCEPT, multiple: false, maxSize: maxBytes, disabled: phase !== 'idle',
    onDropAccepted: (files) => choose(files[0]),
  });
  const rejection = fileRejections[0]?.errors[0];
  const rejectionText = rejection
    ? rejection.code === 'file-too-large' ? `That photo is larger than ${mb(maxBytes)}. Take it at a lower resolution or export a smaller copy.`
      : rejection.code === 'file-invalid-type' ? 'That file is not a photo Gridproof reads (JPEG, PNG, WebP, HEIC, TIFF or AVIF).' : rejection.message
    : null;

  const bed = beds.find((b) => b.id === bedId);

  const submit = async () => {
    setMessage(null);
    setReused(null);
    const parsed = UploadFormSchema.safeParse({ bedId, size, units, title: title || undefined });
    const fieldErrors: Record<string, string> = {};
    if (!parsed.success) for (const i of parsed.error.issues) fieldErrors[String(i.path[0] ?? '_')] ??= i.message;
    const photo = photoProblem(file, maxBytes);
    if (photo) fieldErrors.photo = photo;
    if (bed && !bed.hasPattern) fieldErrors.bedId = 'This bed has no pattern yet; set it up first.';
    const distances = parseDistanceRows(distanceRows, distanceUnits);
    if (!distances.ok) fieldErrors.distances = distances.message;
    setErrors(fieldErrors);
    if (!parsed.success || photo || !file || Object.keys(fieldErrors).length) return;

    const form = new FormData();
    form.set('referenceMm', String(parsed.data.referenceMm));
    if (parsed.data.title) form.set('title', parsed.data.title);
    if (distances.ok && distances.distances.length) form.set('distances', JSON.stringify(distances.distances));
    form.set('photo', file, file.name || 'photo.jpg');
    setPhase('sending');
    setProgress({ loaded: 0, total: file.size });
    const u = xhrUpload(`/api/beds/${encodeURIComponent(parsed.data.bedId)}/checks`, form, setProgress);
    upload.current = u;
    try {
      const { status, body } = await u.promise;
      const b = body as { check?: { id?: string }; reused?: boolean; error?: { message?: string; fields?: Record<string, string> } } | null;
      if (status === 202 && b?.check?.id && b.reused) {
        setPhase('idle');
        setProgress(null);
        setReused(b.check.id);
        return;
      }
      if (status === 202 && b?.check?.id) {
        setPhase('queued');
        router.push(`/checks/${b.check.id}`);
        return;
      }
      setPhase('idle');
      setProgress(null);
      const f = b?.error?.fields ?? {};
      setErrors({ ...(f.photo ? { photo: f.photo } : {}), ...(f.referenceMm ? { size: f.referenceMm } : {}), ...(f.distances ? { distances: f.distances } : {}) });
      setMessage(b?.error?.message ?? `The server answered ${status}. Try again.`);
    } catch (e) {
      setPhase('idle');
      setProgress(null);
      setMessage(e instanceof DOMException && e.name === 'AbortError' ? 'Upload stopped. Nothing was saved.' : e instanceof Error ? e.message : 'The upload failed.');
    } finally {
      upload.current = null;
    }
  };

  const pct = progress && progress.total > 0 ? Math.min(100, Math.round((100 * progress.loaded) / progress.total)) : 0;

  return (
    <form className="flex flex-col gap-6" noValidate onSubmit={(e) => { e.preventDefault(); void submit(); }}>
      <section className="panel flex flex-col gap-4" aria-label="Photo">
        <h2 className="text-xl font-bold">1. The photo</h2>
        <div
          {...getRootProps({
            className: `flex min-h-48 cursor-pointer flex-col items-center justify-center gap-2 rounded-xl border-4 border-dashed p-6 text-center text-lg ${isDragActive ? 'border-accent bg-paper' : errors.photo ? 'border-fail' : 'border-line'}`,
          })}
          data-testid="dropzone"
        >
          <input {...getInputProps()} data-testid="photo-input" aria-label="Choose a photo" />
          {preview ? (
            // eslint-disable-next-line @next/next/no-img-element -- a local object URL, not an optimisable asset
            <img src={preview} alt="The chosen photo" className="max-h-80 w-auto rounded-lg border-2 border-line" data-testid="photo-preview" />
          ) : (
            <span className="font-bold">{isDragActive ? 'Drop the photo here' : 'Drag the photo here, or tap to choose one'}</span>
          )}
          {file && <span className="font-mono text-base">{file.name} · {mb(file.size)}</span>}
        </div>
        <input ref={cameraRef} type="file" accept="image/*" capture="environment" className="hidden" data-testid="camera-input" onChange={(e) => { choose(e.target.files?.[0]); e.target.value = ''; }} />
        <div className="flex flex-wrap gap-3">
          <button type="button" className="btn" disabled={phase !== 'idle'} onClick={() => cameraRef.current?.click()}>Take a photo with the camera</button>
          {file && phase === 'idle' && <button type="button" className="btn btn-quiet" onClick={() => setFile(null)}>Remove</button>}
        </div>
        {file && <PhotoPrecheck file={file} bed={bed?.size ?? null} />}
        {(errors.photo || rejectionText) && <p role="alert" className="field-error">{errors.photo ?? rejectionText}</p>}
        <p className="text-sm text-muted">Machine off and spindle stopped before you lean over the bed. Shoot from straight above with the whole bed and the reference square in the frame; no flash glare on the square.</p>
      </section>

      <section className="panel flex flex-col gap-4" aria-label="Details">
        <h2 className="text-xl font-bold">2. What is in it</h2>
        <div className="field">
          <label htmlFor={ids.bed} className="font-bold">Bed</label>
          <select id={ids.bed} className="input" value={bedId} onChange={(e) => setBedId(e.target.value)} data-testid="upload-bed">
            {beds.map((b) => <option key={b.id} value={b.id}>{b.name}{b.hasPattern ? '' : ' (no pattern yet)'}</option>)}
          </select>
          {errors.bedId && <span role="alert" className="field-error">{errors.bedId}</span>}
        </div>
        <fieldset className="flex flex-col gap-3">
          <legend className="font-bold">Reference square, measured side</legend>
          <div className="flex flex-wrap gap-2">
            {REFERENCE_CHOICES.map((c) => (
              <button key={c.label} type="button" className={`btn ${Number(size) === c.value && units === c.units ? '' : 'btn-quiet'}`} aria-pressed={Number(size) === c.value && units === c.units}
                onClick={() => { setSize(String(c.value)); setUnits(c.units); }}>{c.label}</button>
            ))}
          </div>
          <div className="flex flex-wrap items-end gap-3">
            <div className="field w-40">
              <label htmlFor={ids.size}>Side</label>
              <input id={ids.size} className="input font-mono text-lg" inputMode="decimal" value={size} onChange={(e) => setSize(e.target.value)} data-testid="reference-size" aria-invalid={!!errors.size} />
            </div>
            <div className="field w-40">
              <label htmlFor={ids.units}>Unit</label>
              <select id={ids.units} className="input" value={units} onChange={(e) => setUnits(e.target.value as Units)} data-testid="reference-units">
                <option value="mm">mm</option>
                <option value="in">in</option>
              </select>
            </div>
          </div>
          {errors.size && <span role="alert" className="field-error">{errors.size}</span>}
          <span className="text-sm text-muted">Measure the printed square edge to edge with a steel rule: printers often scale by a percent or two, and the whole check scales with it.</span>
        </fieldset>
        <DistancesFields rows={distanceRows} units={distanceUnits} error={errors.distances} disabled={phase !== 'idle'} onChange={setDistanceRows} onUnits={setDistanceUnits} />
        <div className="field">
          <label htmlFor={ids.title} className="font-bold">Title <span className="font-normal text-muted">(optional)</span></label>
          <input id={ids.title} className="input" value={title} onChange={(e) => setTitle(e.target.value)} placeholder="e.g. after reseating strip 3" />
          {errors.title && <span role="alert" className="field-error">{errors.title}</span>}
        </div>
      </section>

      <section className="panel flex flex-col gap-3" aria-label="Send">
        {progress && (
          <div className="flex flex-col gap-1" data-testid="upload-progress">
            <div className="flex justify-between font-bold"><span>{phase === 'queued' ? 'Sent. Opening the check…' : pct >= 100 ? 'Sent; the server is storing it…' : 'Sending the photo…'}</span><span className="font-mono">{pct}%</span></div>
            <progress className="h-5 w-full accent-[var(--accent)]" max={100} value={pct} aria-label="Upload progress">{pct}%</progress>
            {progress.total > 0 && <span className="font-mono text-sm text-muted">{mb(Math.min(progress.loaded, progress.total))} of {mb(progress.total)}</span>}
          </div>
        )}
        {message && <p role="alert" className="field-error">{message}</p>}
        {reused && (
          <p role="status" data-testid="upload-reused">
            This photo was already checked against this pattern with the same reference size and distances, so it is not measured again. <Link href={`/checks/${reused}`} className="underline">Open that check</Link>, or change the photo or its details.
          </p>
        )}
        <div className="flex flex-wrap gap-3">
          <button type="submit" className="btn text-lg" disabled={phase !== 'idle'} data-testid="upload-submit">Upload and check</button>
          {phase === 'sending' && <button type="button" className="btn btn-danger" onClick={() => upload.current?.abort()}>Stop</button>}
        </div>
      </section>
    </form>
  );
}
