'use client';
/**
 * Bed setup: start from a preset sized to the bed and its strips, from scratch, or from a pattern JSON file;
 * edit hole families, panels, T-track channels and the bed's size in mm or inches; see the pattern drawn to
 * scale with its mistakes (lib/patterns/lint.ts) as you type; validate with the measurement core's
 * PatternSchema; export the JSON; save through the beds API (POST /api/beds creates a bed, PATCH
 * /api/beds/{id} saves a new pattern revision).
 *
 * All lengths in the form are in the pattern's units (bed frame: origin front-left, +X right, +Y away from
 * the operator); a `toleranceMm` fit is always millimetres.
 */
import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { useMemo, useState, type ReactNode } from 'react';
import { api, errorText, ApiError } from '@/components/api';
import { HOLE_KIND_NAME } from '@/lib/geometry/labels';
import { HOLE_KINDS, MM_PER_IN, PatternSchema, type ClearanceClass, type Family, type FitSpec, type HoleKind, type Pattern, type Rect } from '@/lib/geometry/contract';
import { FASTENERS } from '@/lib/geometry/fits';
import { PRESETS } from '@/lib/geometry/presets';
import { lintPattern, type LintResult } from '@/lib/patterns/lint';
import { convertPattern, fromMm, toMm } from '@/lib/patterns/units';
import { NumField, SelectField, TextField } from './fields';
import { PatternDrawing } from './PatternDrawing';

type Units = 'mm' | 'in';
type PresetRef = { preset: string; bedWidthMm: number; bedHeightMm: number; stripWidthMm?: number };

const CLASS_NAMES: Record<ClearanceClass, string> = { fine: 'fine (ISO 273)', medium: 'medium (ISO 273)', coarse: 'coarse (ISO 273)', close: 'close (ASME B18.2.8)', normal: 'normal (ASME B18.2.8)', loose: 'loose (ASME B18.2.8)' };
const METRIC_CLASSES: ClearanceClass[] = ['fine', 'medium', 'coarse'];
const INCH_CLASSES: ClearanceClass[] = ['close', 'normal', 'loose'];

/** A friendly name for a schema path, e.g. families.0.pitch.x → "Hole family 1 › pitch › x". */
function pathWords(path: PropertyKey[]): string {
  const words: string[] = [];
  for (let i = 0; i < path.length; i++) {
    const k = path[i];
    const next = path[i + 1];
    if ((k === 'families' || k === 'panels' || k === 'channels') && typeof next === 'number') {
      words.push(`${k === 'families' ? 'Hole family' : k === 'panels' ? 'Panel' : 'Channel'} ${next + 1}`);
      i++;
    } else words.push(String(k));
  }
  return words.join(' › ') || 'Pattern';
}

/** Count and first centre along a length so the lattice sits centred with at least half a pitch of margin. */
function spread(length: number, pitch: number): { count: number; origin: number } {
  const count = Math.max(1, Math.floor((length - pitch) / pitch + 1e-9) + 1);
  return { count, origin: (length - (count - 1) * pitch) / 2 };
}

function stripsAlongX(bed: Pattern['bed'], strip: number): Pattern['panels'] {
  if (!(strip > 0) || strip >= bed.height) return undefined;
  const n = Math.ceil(bed.height / strip - 1e-9);
  return Array.from({ length: n }, (_, i) => ({ id: `S${i + 1}`, x: 0, y: +(i * strip).toFixed(6), width: bed.width, height: +Math.min(strip, bed.height - i * strip).toFixed(6) }));
}

function scratchPattern(units: Units): Pattern {
  const custom = PRESETS.find((p) => p.id === 'custom') ?? PRESETS[0]!;
  const p = custom.size({ bedWidthMm: 600, bedHeightMm: 900, pitchMm: 50, holeDiameterMm: 6, toleranceMm: 0.2 });
  return convertPattern({ ...p, name: 'My bed' }, units);
}

function download(name: string, text: string) {
  const url = URL.createObjectURL(new Blob([text], { type: 'application/json' }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

export interface PatternEditorProps {
  mode: 'create' | 'edit';
  bedId?: string;
  initialName?: string;
  initialPattern?: Pattern | null;
  /** The signed-in user's units; new patterns and size fields start in them. */
  userUnits: Units;
}

export function PatternEditor({ mode, bedId, initialName = '', initialPattern = null, userUnits }: PatternEditorProps) {
  const router = useRouter();
  const [name, setName] = useState(initialName);
  const [draft, setDraft] = useState<Pattern | null>(initialPattern);
  const [fromPreset, setFromPreset] = useState<{ ref: PresetRef; json: string } | null>(null);
  const [importError, setImportError] = useState<string | null>(null);

  // Preset chooser (sizes typed in the user's units).
  const [presetId, setPresetId] = useState(PRESETS[0]?.id ?? 'custom');
  const [presetUnits, setPresetUnits] = useState<Units>(userUnits);
  const [size, setSize] = useState(() => ({ w: fromMm(1220, userUnits), h: fromMm(2440, userUnits), strip: 0 }));

  const parsed = useMemo(() => (draft ? PatternSchema.safeParse(draft) : null), [draft]);
  const lint: LintResult | null = useMemo(() => {
    if (!parsed?.success) return null;
    try {
      return lintPattern(parsed.data);
    } catch {
      return null;
    }
  }, [parsed]);

  const buildPreset = () => {
    const preset = PRESETS.find((p) => p.id === presetId);
    if (!preset) return;
    const ref: PresetRef = { preset: preset.id, bedWidthMm: toMm(size.w, presetUnits), bedHeightMm: toMm(size.h, presetUnits), ...(size.strip > 0 ? { stripWidthMm: toMm(size.strip, presetUnits) } : {}) };
    try {
      const p = preset.size(ref);
      setDraft(p);
      setFromPreset({ ref, json: JSON.stringify(p) });
      setImportError(null);
      if (!name.trim()) setName(preset.name);
    } catch (e) {
      setImportError(`That preset does not fit this bed: ${errorText(e)}`);
    }
  };

  const importFile = async (file: File) => {
    try {
      const json: unknown = JSON.parse(await file.text());
      const r = PatternSchema.safeParse(json);
      if (!r.success) {
        setImportError(`The file is not a pattern Gridproof can use: ${r.error.issues.slice(0, 3).map((i) => `${pathWords(i.path)}: ${i.message}`).join('; ')}`);
        return;
      }
      setDraft(r.data);
      setFromPreset(null);
      setImportError(null);
      if (!name.trim()) setName(r.data.name);
    } catch {
      setImportError('The file is not valid JSON.');
    }
  };

  const save = useMutation({
    mutationFn: async () => {
      if (!draft || !parsed?.success) throw new Error('Fix the pattern first.');
      const unchangedPreset = fromPreset && JSON.stringify(draft) === fromPreset.json;
      const patternPart = unchangedPreset ? { preset: fromPreset.ref } : { pattern: parsed.data };
      if (mode === 'create') {
        const r = await api<{ bed: { id: string } }>('/api/beds', { method: 'POST', body: { name: name.trim(), ...patternPart } });
        return r.bed.id;
      }
      const r = await api<{ bed: { id: string } }>(`/api/beds/${bedId}`, { method: 'PATCH', body: { ...(name.trim() ? { name: name.trim() } : {}), ...patternPart } });
      return r.bed.id;
    },
    onSuccess: (id) => {
      router.push(`/beds/${id}`);
      router.refresh();
    },
  });

  const set = (fn: (p: Pattern) => Pattern) => setDraft((p) => (p ? fn(p) : p));
  const setFamily = (i: number, fn: (f: Family) => Family) => set((p) => ({ ...p, families: p.families.map((f, j) => (j === i ? fn(f) : f)) }));
  const setRect = (key: 'panels' | 'channels', i: number, patch: Partial<Rect & { id: string }>) =>
    set((p) => ({ ...p, [key]: (p[key] ?? []).map((q, j) => (j === i ? { ...q, ...patch } : q)) }));
  const removeRect = (key: 'panels' | 'channels', i: number) =>
    set((p) => {
      const list = (p[key] ?? []).filter((_, j) => j !== i);
      const { [key]: _drop, ...rest } = p;
      return (list.length ? { ...rest, [key]: list } : rest) as Pattern;
    });

  const u = draft?.units ?? userUnits;
  const mistakes = lint?.mistakes ?? 0;
  const saveBox = (
    <section className="panel flex flex-col gap-3" aria-label="Save">
      {save.isError && <p role="alert" className="field-error">{errorText(save.error)}{save.error instanceof ApiError && Object.keys(save.error.fields).length ? ` (${Object.entries(save.error.fields).slice(0, 3).map(([k, v]) => `${k}: ${v}`).join('; ')})` : ''}</p>}
      {mistakes > 0 && <p className="font-bold text-warn">You can save with mistakes, but checks will measure against this pattern as it is.</p>}
      <button type="button" className="btn text-lg" data-testid="pattern-save" disabled={!parsed?.success || !name.trim() || save.isPending} onClick={() => save.mutate()}>
        {save.isPending ? 'Saving…' : mode === 'create' ? 'Create the bed' : 'Save as a new pattern revision'}
      </button>
      {mode === 'edit' && <p className="text-sm text-muted">Earlier checks keep the revision they were measured against.</p>}
    </section>
  );

  return (
    <div className="flex flex-col gap-6">
      <details className="panel flex flex-col gap-4" aria-label="Start" open={mode === 'create'}>
        <summary className="cursor-pointer text-xl font-bold">{mode === 'create' ? '1. Start the pattern' : 'Start over from a preset, from scratch or from a file'}</summary>
        <div className="mt-4 grid gap-4 md:grid-cols-2">
          <div className="flex flex-col gap-3">
            <SelectField label="Preset" value={presetId} testId="preset-select" options={PRESETS.map((p) => ({ value: p.id, label: p.name }))} onChange={setPresetId} />
            <p className="text-sm text-muted">{PRESETS.find((p) => p.id === presetId)?.description}</p>
            <SelectField<Units> label="Sizes in" value={presetUnits} options={[{ value: 'mm', label: 'millimetres' }, { value: 'in', label: 'inches' }]}
              onChange={(v) => { setSize((s) => ({ w: +fromMm(toMm(s.w, presetUnits), v).toFixed(3), h: +fromMm(toMm(s.h, presetUnits), v).toFixed(3), strip: +fromMm(toMm(s.strip, presetUnits), v).toFixed(3) })); setPresetUnits(v); }} />
            <div className="grid grid-cols-2 gap-3">
              <NumField label="Bed width, X" unit={presetUnits} value={size.w} min={0} testId="preset-width" onChange={(w) => setSize((s) => ({ ...s, w }))} />
              <NumField label="Bed depth, Y" unit={presetUnits} value={size.h} min={0} testId="preset-height" onChange={(h) => setSize((s) => ({ ...s, h }))} />
            </div>
            <NumField label="Strip width" unit={presetUnits} value={size.strip} min={0} testId="preset-strip" hint="Width (along Y) of each strip the bed is made of; 0 for one piece." onChange={(strip) => setSize((s) => ({ ...s, strip }))} />
            <button type="button" className="btn self-start" data-testid="preset-build" onClick={buildPreset}>Use this preset</button>
          </div>
          <div className="flex flex-col gap-3">
            <button type="button" className="btn btn-quiet self-start" onClick={() => { setDraft(scratchPattern(userUnits)); setFromPreset(null); setImportError(null); }}>Start from scratch</button>
            <label className="field">
              <span>Import a pattern file (JSON)</span>
              <input type="file" accept="application/json,.json" className="input" data-testid="pattern-import"
                onChange={(e) => { const f = e.target.files?.[0]; if (f) void importFile(f); e.target.value = ''; }} />
            </label>
            {draft && (
              <button type="button" className="btn btn-quiet self-start" data-testid="pattern-export"
                onClick={() => download(`${(draft.name || 'pattern').replace(/[^A-Za-z0-9_-]+/g, '-')}.pattern.json`, JSON.stringify(draft, null, 2))}>
                Export this pattern (JSON)
              </button>
            )}
          </div>
        </div>
        {importError && <p role="alert" className="field-error">{importError}</p>}
      </details>

      {draft && (
        <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
          <div className="flex flex-col gap-6">
            <section className="panel flex flex-col gap-4" aria-label="Bed">
              <h2 className="text-xl font-bold">{mode === 'create' ? '2. The bed' : 'The bed'}</h2>
              <TextField label="Bed name" value={name} testId="bed-name" required onChange={setName} />
              <TextField label="Pattern name" value={draft.name} onChange={(v) => set((p) => ({ ...p, name: v }))} />
              <SelectField<Units> label="Units of this pattern" value={draft.units} testId="pattern-units"
                options={[{ value: 'mm', label: 'millimetres (mm)' }, { value: 'in', label: 'inches (in)' }]}
                onChange={(v) => { if (parsed?.success) set((p) => convertPattern(p, v)); }} />
              <div className="grid grid-cols-2 gap-3">
                <NumField label="Width, X" unit={u} value={draft.bed.width} min={0} onChange={(width) => set((p) => ({ ...p, bed: { ...p.bed, width } }))} />
                <NumField label="Depth, Y" unit={u} value={draft.bed.height} min={0} onChange={(height) => set((p) => ({ ...p, bed: { ...p.bed, height } }))} />
              </div>
              <p className="text-sm text-muted">Origin at the front-left corner; X runs to the right, Y away from you.</p>
            </section>

            <section className="panel flex flex-col gap-4" aria-label="Hole families">
              <h2 className="text-xl font-bold">Hole families</h2>
              {draft.families.map((f, i) => (
                <FamilyCard key={i} index={i} family={f} units={u} bed={draft.bed} canRemove={draft.families.length > 1}
                  onChange={(fn) => setFamily(i, fn)} onRemove={() => set((p) => ({ ...p, families: p.families.filter((_, j) => j !== i) }))} />
              ))}
              {draft.families.length < 8 && (
                <button type="button" className="btn btn-quiet self-start" onClick={() => set((p) => ({
                  ...p,
                  families: [...p.families, { id: `family${p.families.length + 1}`, kind: 'dog-hole', holeDiameter: u === 'in' ? 0.75 : 20, origin: { x: u === 'in' ? 3 : 75, y: u === 'in' ? 3 : 75 }, pitch: { x: u === 'in' ? 6 : 150, y: u === 'in' ? 6 : 150 }, count: { x: 2, y: 2 }, fit: { toleranceMm: 0.1 } }],
                }))}>Add a hole family</button>
              )}
            </section>

            <RectList title="Panels" what="panel" units={u} items={draft.panels ?? []} withId
              onAdd={() => set((p) => ({ ...p, panels: [...(p.panels ?? []), { id: `P${(p.panels?.length ?? 0) + 1}`, x: 0, y: 0, width: p.bed.width, height: p.bed.height }] }))}
              onChange={(i, patch) => setRect('panels', i, patch)} onRemove={(i) => removeRect('panels', i)}
              extra={<StripCutter units={u} onCut={(w) => set((p) => { const panels = stripsAlongX(p.bed, w); const { panels: _x, ...rest } = p; return panels ? { ...rest, panels } : rest; })} />} />

            <RectList title="T-track channels" what="channel" units={u} items={draft.channels ?? []}
              onAdd={() => set((p) => ({ ...p, channels: [...(p.channels ?? []), { x: 0, y: +(p.bed.height / 2).toFixed(3), width: p.bed.width, height: u === 'in' ? 0.75 : 19 }] }))}
              onChange={(i, patch) => setRect('channels', i, patch)} onRemove={(i) => removeRect('channels', i)} />
          </div>

          <div className="order-first flex flex-col gap-4 lg:order-none lg:sticky lg:top-4 lg:self-start">
            <section className="panel flex flex-col gap-3" aria-label="Drawing">
              <h2 className="text-xl font-bold">Drawing</h2>
              {parsed?.success ? <PatternDrawing pattern={parsed.data} lint={lint} /> : <p className="text-muted">The drawing comes back once the pattern is valid.</p>}
            </section>
            <section className="panel flex flex-col gap-2" aria-label="Mistakes" data-testid="pattern-findings">
              <h2 className="text-xl font-bold">{parsed && !parsed.success ? 'The pattern is not valid' : mistakes === 0 ? 'No mistakes found' : `${mistakes} mistake${mistakes === 1 ? '' : 's'}`}</h2>
              {parsed && !parsed.success && (
                <ul className="list-disc pl-6">
                  {parsed.error.issues.slice(0, 12).map((iss, k) => <li key={k} className="field-error">{pathWords(iss.path)}: {iss.message}</li>)}
                </ul>
              )}
              {lint && lint.findings.length > 0 && (
                <ul className="flex max-h-80 flex-col gap-1 overflow-y-auto">
                  {lint.findings.map((f, k) => (
                    <li key={k} className={f.severity === 'mistake' ? 'font-bold text-fail' : 'text-muted'}>{f.severity === 'mistake' ? '✗ ' : 'ℹ '}{f.message}</li>
                  ))}
                  {Object.entries(lint.omitted).map(([code, n]) => <li key={code} className="text-muted">…and {n} more like these ({code}).</li>)}
                </ul>
              )}
              {lint && lint.mistakes === 0 && <p>Holes clear each other, the channels, the panel edges and the bed&apos;s edge.</p>}
            </section>
            <div className="hidden lg:block">{saveBox}</div>
          </div>
        </div>
      )}
      {draft && <div className="lg:hidden">{saveBox}</div>}
    </div>
  );
}

function FitEditor({ fit, units, onChange }: { fit: FitSpec; units: Units; onChange: (f: FitSpec) => void }) {
  const type = 'fastener' in fit ? 'fastener' : 'pinDiameter' in fit ? 'pin' : 'tolerance';
  return (
    <div className="flex flex-col gap-3 rounded-lg border border-line p-3">
      <SelectField label="What goes in these holes" value={type}
        options={[{ value: 'fastener', label: 'A bolt or screw (clearance class)' }, { value: 'pin', label: 'A pin or dog of known diameter' }, { value: 'tolerance', label: 'A tolerance I give' }]}
        onChange={(t) => onChange(t === 'fastener' ? { fastener: units === 'in' ? '1/4-20' : 'M6', clearance: units === 'in' ? 'normal' : 'medium' } : t === 'pin' ? { pinDiameter: units === 'in' ? 0.75 : 19.9 } : { toleranceMm: 0.2 })} />
      {'fastener' in fit && (
        <div className="grid grid-cols-2 gap-3">
          <SelectField label="Fastener" value={fit.fastener} options={FASTENERS.map((n) => ({ value: n, label: n }))}
            onChange={(fastener) => onChange({ fastener, clearance: /^M/i.test(fastener) ? (METRIC_CLASSES.includes(fit.clearance) ? fit.clearance : 'medium') : (INCH_CLASSES.includes(fit.clearance) ? fit.clearance : 'normal') })} />
          <SelectField<ClearanceClass> label="Clearance class" value={fit.clearance}
            options={(/^M/i.test(fit.fastener) ? METRIC_CLASSES : INCH_CLASSES).map((c) => ({ value: c, label: CLASS_NAMES[c] }))}
            onChange={(clearance) => onChange({ fastener: fit.fastener, clearance })} />
        </div>
      )}
      {'pinDiameter' in fit && <NumField label="Pin or dog diameter" unit={units} value={fit.pinDiameter} min={0} onChange={(pinDiameter) => onChange({ pinDiameter })} />}
      {'toleranceMm' in fit && <NumField label="Radial tolerance" unit="mm" value={fit.toleranceMm} min={0} onChange={(toleranceMm) => onChange({ toleranceMm })} hint="How far a hole's centre may stray and still take what goes in it." />}
    </div>
  );
}

function FamilyCard({ index, family: f, units, bed, canRemove, onChange, onRemove }: {
  index: number; family: Family; units: Units; bed: Pattern['bed']; canRemove: boolean; onChange: (fn: (f: Family) => Family) => void; onRemove: () => void;
}) {
  const centre = () => onChange((g) => {
    const sx = spread(bed.width, g.pitch.x), sy = spread(bed.height, g.pitch.y);
    return { ...g, count: { x: sx.count, y: sy.count }, origin: { x: +sx.origin.toFixed(6), y: +sy.origin.toFixed(6) } };
  });
  return (
    <fieldset className="flex flex-col gap-3 rounded-lg border-2 border-line p-3" data-testid={`family-${index}`}>
      <legend className="px-1 text-lg font-bold">Family {index + 1}: {f.label ?? f.id}</legend>
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Id" value={f.id} onChange={(id) => onChange((g) => ({ ...g, id }))} />
        <SelectField<HoleKind> label="Kind" value={f.kind} options={HOLE_KINDS.map((k) => ({ value: k, label: HOLE_KIND_NAME[k] }))} onChange={(kind) => onChange((g) => ({ ...g, kind }))} />
        <NumField label="Hole diameter" unit={units} value={f.holeDiameter} min={0} testId={`family-${index}-diameter`} onChange={(holeDiameter) => onChange((g) => ({ ...g, holeDiameter }))} />
        <TextField label="Word in labels" value={f.label ?? ''} onChange={(label) => onChange((g) => { const { label: _l, ...rest } = g; return label.trim() ? { ...rest, label } : rest; })} />
        <NumField label="Pitch X" unit={units} value={f.pitch.x} min={0} testId={`family-${index}-pitch-x`} onChange={(x) => onChange((g) => ({ ...g, pitch: { ...g.pitch, x } }))} />
        <NumField label="Pitch Y" unit={units} value={f.pitch.y} min={0} onChange={(y) => onChange((g) => ({ ...g, pitch: { ...g.pitch, y } }))} />
        <NumField label="First hole X" unit={units} value={f.origin.x} onChange={(x) => onChange((g) => ({ ...g, origin: { ...g.origin, x } }))} />
        <NumField label="First hole Y" unit={units} value={f.origin.y} onChange={(y) => onChange((g) => ({ ...g, origin: { ...g.origin, y } }))} />
        <NumField label="Columns (along X)" integer value={f.count.x} min={1} onChange={(x) => onChange((g) => ({ ...g, count: { ...g.count, x } }))} />
        <NumField label="Rows (along Y)" integer value={f.count.y} min={1} onChange={(y) => onChange((g) => ({ ...g, count: { ...g.count, y } }))} />
      </div>
      <FitEditor fit={f.fit} units={units} onChange={(fit) => onChange((g) => ({ ...g, fit }))} />
      <div className="flex flex-wrap gap-2">
        <button type="button" className="btn btn-quiet" onClick={centre}>Fill the bed, centred</button>
        {canRemove && <button type="button" className="btn btn-danger" onClick={onRemove}>Remove family</button>}
      </div>
      <p className="text-sm text-muted">{f.count.x * f.count.y} positions; first hole (column A, row 1) is the one nearest the front-left corner.</p>
    </fieldset>
  );
}

function StripCutter({ units, onCut }: { units: Units; onCut: (width: number) => void }) {
  const [w, setW] = useState(units === 'in' ? 6 : 150);
  return (
    <div className="flex flex-wrap items-end gap-3 rounded-lg border border-line p-3">
      <div className="w-40"><NumField label="Strip width" unit={units} value={w} min={0} onChange={setW} /></div>
      <button type="button" className="btn btn-quiet" onClick={() => onCut(w)}>Cut the bed into strips</button>
      <button type="button" className="btn btn-quiet" onClick={() => onCut(0)}>One piece</button>
    </div>
  );
}

function RectList({ title, what, units, items, withId = false, onAdd, onChange, onRemove, extra }: {
  title: string; what: string; units: Units; items: (Rect & { id?: string })[]; withId?: boolean;
  onAdd: () => void; onChange: (i: number, patch: Partial<Rect & { id: string }>) => void; onRemove: (i: number) => void; extra?: ReactNode;
}) {
  return (
    <section className="panel flex flex-col gap-4" aria-label={title}>
      <h2 className="text-xl font-bold">{title}</h2>
      {extra}
      {items.length === 0 && <p className="text-muted">None.</p>}
      {items.map((q, i) => (
        <fieldset key={i} className="grid grid-cols-2 gap-3 rounded-lg border border-line p-3 sm:grid-cols-3">
          <legend className="px-1 font-bold">{withId ? `Panel ${q.id ?? i + 1}` : `Channel ${i + 1}`}</legend>
          {withId && <TextField label="Id" value={q.id ?? ''} onChange={(id) => onChange(i, { id })} />}
          <NumField label="Left edge X" unit={units} value={q.x} onChange={(x) => onChange(i, { x })} />
          <NumField label="Front edge Y" unit={units} value={q.y} onChange={(y) => onChange(i, { y })} />
          <NumField label="Width (X)" unit={units} value={q.width} min={0} onChange={(width) => onChange(i, { width })} />
          <NumField label="Depth (Y)" unit={units} value={q.height} min={0} onChange={(height) => onChange(i, { height })} />
          <div className="flex items-end"><button type="button" className="btn btn-danger w-full" onClick={() => onRemove(i)}>Remove</button></div>
        </fieldset>
      ))}
      <button type="button" className="btn btn-quiet self-start" onClick={onAdd}>Add a {what}</button>
      <p className="text-sm text-muted">Sizes in {units === 'in' ? `inches (1 in = ${MM_PER_IN} mm)` : 'millimetres'}.</p>
    </section>
  );
}
