'use client';
/** The dashboard's bed list (GET /api/beds) and the new-bed form (POST /api/beds), through TanStack Query. */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import Link from 'next/link';
import { useState } from 'react';
import type { BedDto } from '@/lib/services/beds';
import { api, errorText, fieldError } from './api';
import { Verdict } from './Verdict';
import { formatUtc } from '@/lib/dates';

export type PresetOption = { id: string; name: string; description: string };


export function BedsBoard({ initialBeds, canCreate, presets }: { initialBeds: BedDto[]; canCreate: boolean; presets: PresetOption[] }) {
  const beds = useQuery({ queryKey: ['beds'], queryFn: () => api<{ beds: BedDto[] }>('/api/beds').then((r) => r.beds), initialData: initialBeds });
  const list = beds.data ?? [];
  return (
    <div className="flex flex-col gap-6">
      {list.length === 0 ? (
        <section className="panel flex flex-col gap-2" aria-label="No beds yet">
          <h2 className="text-xl font-bold">No beds yet</h2>
          {canCreate ? (
            <ol className="list-decimal pl-6">
              <li>Add your bed below: pick the hole pattern it was drilled to and give its size.</li>
              <li>Then lay the reference square on the bed, switch the machine off, and take one photo from above.</li>
              <li>Gridproof shows where each hole really is and which panel to move.</li>
            </ol>
          ) : (
            <p>Ask the workshop owner or a machinist to add the first bed; you can then read its checks and comment.</p>
          )}
        </section>
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2" aria-label="Beds">
          {list.map((b) => (
            <li key={b.id}>
              <Link href={`/beds/${b.id}`} className="panel flex h-full flex-col gap-2 no-underline hover:border-accent">
                <span className="flex items-start justify-between gap-2">
                  <span className="text-xl font-bold">{b.name}</span>
                  <Verdict status={b.lastCheck?.status} verdict={b.lastCheck?.verdict} />
                </span>
                {b.pattern && (
                  <span className="text-muted">
                    {b.pattern.name} · {b.pattern.bed.width} × {b.pattern.bed.height} {b.pattern.units} · {b.pattern.positions} positions
                  </span>
                )}
                <span className="text-sm text-muted">
                  {b.checkCount === 0 ? 'No check yet' : `${b.checkCount} check${b.checkCount === 1 ? '' : 's'}, last ${formatUtc(b.lastCheck!.createdAt)}`}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}
      {canCreate && (
        <p>
          <Link href="/beds/new" className="btn btn-quiet">Set up a bed in detail: families, panels, T-track</Link>
        </p>
      )}
      {canCreate && <NewBedForm presets={presets} />}
    </div>
  );
}

function NewBedForm({ presets }: { presets: PresetOption[] }) {
  const qc = useQueryClient();
  const [mode, setMode] = useState<'preset' | 'json'>('preset');
  const [name, setName] = useState('');
  const [preset, setPreset] = useState(presets[0]?.id ?? '');
  const [size, setSize] = useState({ bedWidthMm: '1220', bedHeightMm: '2440', stripWidthMm: '' });
  const [json, setJson] = useState('');
  const [jsonError, setJsonError] = useState<string | null>(null);
  const m = useMutation({
    mutationFn: (body: unknown) => api<{ bed: BedDto }>('/api/beds', { body }),
    onSuccess: () => {
      setName('');
      setJson('');
      return qc.invalidateQueries({ queryKey: ['beds'] });
    },
  });
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    setJsonError(null);
    if (mode === 'preset') {
      const ref: Record<string, unknown> = { preset, bedWidthMm: Number(size.bedWidthMm), bedHeightMm: Number(size.bedHeightMm) };
      if (size.stripWidthMm) ref.stripWidthMm = Number(size.stripWidthMm);
      m.mutate({ name, preset: ref });
    } else {
      try {
        m.mutate({ name, pattern: JSON.parse(json) as unknown });
      } catch {
        setJsonError('This is not valid JSON.');
      }
    }
  };
  const fields = m.error && 'fields' in m.error ? (m.error as { fields: Record<string, string> }).fields : {};
  const patternProblems = Object.entries(fields).filter(([k]) => k.startsWith('pattern') || k.startsWith('preset'));
  return (
    <form onSubmit={submit} className="panel flex flex-col gap-4" aria-label="Add a bed">
      <h2 className="text-xl font-bold">Add a bed</h2>
      <label className="field">
        <span>Name</span>
        <input className="input" name="name" value={name} onChange={(e) => setName(e.target.value)} placeholder="Main router spoilboard" required />
        {fieldError(m.error, 'name') && <small className="field-error">{fieldError(m.error, 'name')}</small>}
      </label>
      <fieldset className="flex flex-wrap gap-4">
        <legend className="font-bold">Pattern</legend>
        <label className="flex min-h-12 items-center gap-2"><input type="radio" name="mode" checked={mode === 'preset'} onChange={() => setMode('preset')} className="size-5" /> From a preset</label>
        <label className="flex min-h-12 items-center gap-2"><input type="radio" name="mode" checked={mode === 'json'} onChange={() => setMode('json')} className="size-5" /> Pattern JSON</label>
      </fieldset>
      {mode === 'preset' ? (
        <div className="grid gap-4 sm:grid-cols-2">
          <label className="field sm:col-span-2">
            <span>Preset</span>
            <select className="input" name="preset" value={preset} onChange={(e) => setPreset(e.target.value)}>
              {presets.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
            </select>
            <small className="text-muted">{presets.find((p) => p.id === preset)?.description}</small>
          </label>
          <label className="field"><span>Bed width (X), mm</span><input className="input" inputMode="decimal" name="bedWidthMm" value={size.bedWidthMm} onChange={(e) => setSize({ ...size, bedWidthMm: e.target.value })} /></label>
          <label className="field"><span>Bed depth (Y), mm</span><input className="input" inputMode="decimal" name="bedHeightMm" value={size.bedHeightMm} onChange={(e) => setSize({ ...size, bedHeightMm: e.target.value })} /></label>
          <label className="field sm:col-span-2"><span>Strip width, mm (empty for one piece)</span><input className="input" inputMode="decimal" name="stripWidthMm" value={size.stripWidthMm} onChange={(e) => setSize({ ...size, stripWidthMm: e.target.value })} /></label>
        </div>
      ) : (
        <label className="field">
          <span>Pattern JSON (version 1 of the pattern format)</span>
          <textarea className="input min-h-48 font-mono text-sm" name="pattern" value={json} onChange={(e) => setJson(e.target.value)} spellCheck={false} />
        </label>
      )}
      {jsonError && <p role="alert" className="field-error">{jsonError}</p>}
      {m.isError && (
        <div role="alert" className="field-error">
          <p>{errorText(m.error)}</p>
          {patternProblems.length > 0 && <ul className="list-disc pl-6 font-normal">{patternProblems.slice(0, 8).map(([k, v]) => <li key={k}><code className="font-mono">{k}</code>: {v}</li>)}</ul>}
        </div>
      )}
      {m.isSuccess && <p role="status">Added “{m.data.bed.name}”.</p>}
      <button className="btn self-start" type="submit" disabled={m.isPending}>{m.isPending ? 'Adding…' : 'Add bed'}</button>
    </form>
  );
}
