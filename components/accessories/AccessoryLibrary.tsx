'use client';
/**
 * The workshop's accessory library: our presets with their settings, or pins given one by one (offset in mm
 * or lattice steps, diameter, the hole family they enter, and the accessory's own through hole for a bolt).
 * Owners and machinists change it; everyone reads it.
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { api, errorText } from '@/components/api';

interface PresetField { name: string; label: string; kind: 'int' | 'mm' | 'fastener'; default?: number | string }
interface Preset { id: string; name: string; description: string; fields: PresetField[] }
interface Pin { label?: string; x: number; y: number; unit: 'mm' | 'steps'; family: string; diameterMm: number; throughHoleMm?: number; clearanceMm?: number }
interface Accessory { id: string; name: string; presetId: string | null; spec: { pins: Pin[]; note?: string }; createdAt: number }
export interface BedPitch { name: string; pitchXMm: number; pitchYMm: number }

const FAMILIES = [['threaded-insert', 'threaded inserts'], ['dog-hole', 'dog holes'], ['pin-hole', 'pin holes'], ['other', 'other holes']] as const;
const blankPin = (): Pin => ({ x: 0, y: 0, unit: 'steps', family: 'threaded-insert', diameterMm: 8, throughHoleMm: 9 });

export function AccessoryLibrary({ canEdit, bedPitches }: { canEdit: boolean; bedPitches: BedPitch[] }) {
  const qc = useQueryClient();
  const q = useQuery({ queryKey: ['accessories'], queryFn: () => api<{ accessories: Accessory[]; presets: Preset[] }>('/api/accessories') });
  const [presetId, setPresetId] = useState('fence-two-bolt');
  const [name, setName] = useState('');
  const [params, setParams] = useState<Record<string, string>>({});
  const [pins, setPins] = useState<Pin[]>([blankPin(), { ...blankPin(), x: 2 }]);
  const [customName, setCustomName] = useState('');
  const refresh = () => qc.invalidateQueries({ queryKey: ['accessories'] });
  const preset = q.data?.presets.find((p) => p.id === presetId);

  const addPreset = useMutation({
    mutationFn: () => {
      const values: Record<string, unknown> = {};
      for (const f of preset?.fields ?? []) {
        const raw = params[f.name] ?? (f.default !== undefined ? String(f.default) : '');
        if (raw !== '') values[f.name] = f.kind === 'fastener' ? raw : Number(raw);
      }
      return api('/api/accessories', { body: { name: name || preset?.name || 'Accessory', preset: presetId, params: values } });
    },
    onSuccess: async () => { setName(''); setParams({}); await refresh(); },
  });
  const addCustom = useMutation({
    mutationFn: () => api('/api/accessories', { body: { name: customName, spec: { version: 1, pins: pins.map((p) => ({ ...p, label: p.label || undefined, throughHoleMm: p.throughHoleMm || undefined, clearanceMm: p.clearanceMm ?? undefined })) } } }),
    onSuccess: async () => { setCustomName(''); await refresh(); },
  });
  const del = useMutation({ mutationFn: (id: string) => api(`/api/accessories/${id}`, { method: 'DELETE' }), onSuccess: refresh });

  const setPin = (i: number, patch: Partial<Pin>) => setPins((ps) => ps.map((p, k) => (k === i ? { ...p, ...patch } : p)));
  const takePitch = (b: BedPitch) => setParams((s) => ({ ...s, pitchXMm: String(b.pitchXMm), pitchYMm: String(b.pitchYMm) }));
  const onPreset = (e: FormEvent) => { e.preventDefault(); addPreset.mutate(); };
  const onCustom = (e: FormEvent) => { e.preventDefault(); addCustom.mutate(); };

  if (q.isPending) return <p className="text-muted">Loading the library…</p>;
  if (q.isError) return <p role="alert" className="field-error">{errorText(q.error)}</p>;
  return (
    <div className="flex flex-col gap-6">
      <section className="panel flex flex-col gap-3" aria-labelledby="lib-h">
        <h2 id="lib-h" className="text-xl font-bold">In the library</h2>
        {q.data.accessories.length === 0 ? <p className="text-muted">Nothing yet: add a preset or your own below.</p> : (
          <ul className="flex flex-col gap-2" data-testid="accessory-list">
            {q.data.accessories.map((a) => (
              <li key={a.id} className="flex flex-wrap items-start justify-between gap-3 rounded-lg border border-line p-3">
                <div>
                  <p className="font-bold">{a.name}</p>
                  <p className="text-sm text-muted">{a.spec.pins.length} pin{a.spec.pins.length === 1 ? '' : 's'}{a.presetId ? ` · from the preset ${q.data.presets.find((p) => p.id === a.presetId)?.name ?? a.presetId}` : ' · pins by hand'}{a.spec.note ? ` · ${a.spec.note}` : ''}</p>
                  <p className="font-mono text-sm">{a.spec.pins.slice(0, 6).map((p) => `${p.label ?? 'pin'} (${p.x}, ${p.y}) ${p.unit} ⌀${p.diameterMm}${p.throughHoleMm ? `/${p.throughHoleMm}` : ''}`).join(' · ')}{a.spec.pins.length > 6 ? ' …' : ''}</p>
                </div>
                {canEdit && <button type="button" className="btn btn-danger !min-h-0 !py-1" onClick={() => del.mutate(a.id)}>Remove</button>}
              </li>
            ))}
          </ul>
        )}
      </section>

      {canEdit && (
        <section className="panel flex flex-col gap-4" aria-labelledby="preset-h">
          <h2 id="preset-h" className="text-xl font-bold">Add from a preset</h2>
          <form className="flex flex-col gap-3" onSubmit={onPreset} aria-label="Add from a preset">
            <label className="field"><span>Preset</span>
              <select className="input" value={presetId} onChange={(e) => { setPresetId(e.target.value); setParams({}); }} data-testid="preset-select">
                {q.data.presets.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
              </select>
              {preset && <small className="text-muted">{preset.description}</small>}
            </label>
            <label className="field"><span>Name in the library</span><input className="input" value={name} onChange={(e) => setName(e.target.value)} placeholder={preset?.name} maxLength={120} /></label>
            <div className="grid grid-cols-1 gap-3 sm:grid-cols-3">
              {preset?.fields.map((f) => (
                <label key={f.name} className="field"><span>{f.label}</span>
                  <input className="input" name={f.name} inputMode={f.kind === 'fastener' ? 'text' : 'decimal'} value={params[f.name] ?? (f.default !== undefined ? String(f.default) : '')} onChange={(e) => setParams((s) => ({ ...s, [f.name]: e.target.value }))} required={f.default === undefined} />
                </label>
              ))}
            </div>
            {presetId === 'sacrificial-board' && bedPitches.length > 0 && (
              <p className="flex flex-wrap items-center gap-2 text-sm">Take the pitch of: {bedPitches.map((b) => <button key={b.name} type="button" className="btn btn-quiet !min-h-0 !py-1" onClick={() => takePitch(b)}>{b.name}</button>)}</p>
            )}
            {addPreset.isError && <p role="alert" className="field-error">{errorText(addPreset.error)}</p>}
            <button className="btn self-start" type="submit" disabled={addPreset.isPending} data-testid="preset-add">Add to the library</button>
          </form>
          <p className="text-sm text-muted">Bolt holes default to the ISO 273 medium clearance hole for the bolt (M8: 9 mm).</p>
        </section>
      )}

      {canEdit && (
        <section className="panel flex flex-col gap-4" aria-labelledby="custom-h">
          <h2 id="custom-h" className="text-xl font-bold">Your own accessory, pin by pin</h2>
          <p className="text-muted">Offsets from the accessory&apos;s origin (its first pin, usually), X to the right and Y away from you, in mm or lattice steps of the holes it goes in. A bolt into an insert centres on the insert: give your accessory&apos;s through hole. A dog or dowel in the bed&apos;s own hole: leave the through hole empty.</p>
          <form className="flex flex-col gap-3" onSubmit={onCustom} aria-label="Add your own accessory">
            <label className="field"><span>Name</span><input className="input" value={customName} onChange={(e) => setCustomName(e.target.value)} required maxLength={120} /></label>
            <div className="overflow-x-auto">
              <table className="w-full text-left">
                <thead><tr className="border-b-2 border-line"><th className="py-2 pr-2">Pin</th><th className="pr-2">X</th><th className="pr-2">Y</th><th className="pr-2">in</th><th className="pr-2">Enters</th><th className="pr-2">⌀ pin, mm</th><th className="pr-2">Through hole, mm</th><th /></tr></thead>
                <tbody>
                  {pins.map((p, i) => (
                    <tr key={i} className="border-b border-line">
                      <td className="py-1 pr-2"><input className="input !min-h-0 w-28" value={p.label ?? ''} placeholder={`pin ${i + 1}`} onChange={(e) => setPin(i, { label: e.target.value })} /></td>
                      <td className="pr-2"><input className="input !min-h-0 w-20" inputMode="decimal" value={p.x} onChange={(e) => setPin(i, { x: Number(e.target.value) || 0 })} /></td>
                      <td className="pr-2"><input className="input !min-h-0 w-20" inputMode="decimal" value={p.y} onChange={(e) => setPin(i, { y: Number(e.target.value) || 0 })} /></td>
                      <td className="pr-2"><select className="input !min-h-0" value={p.unit} onChange={(e) => setPin(i, { unit: e.target.value as Pin['unit'] })}><option value="steps">steps</option><option value="mm">mm</option></select></td>
                      <td className="pr-2"><select className="input !min-h-0" value={p.family} onChange={(e) => setPin(i, { family: e.target.value })}>{FAMILIES.map(([v, l]) => <option key={v} value={v}>{l}</option>)}</select></td>
                      <td className="pr-2"><input className="input !min-h-0 w-20" inputMode="decimal" value={p.diameterMm} onChange={(e) => setPin(i, { diameterMm: Number(e.target.value) || 0 })} /></td>
                      <td className="pr-2"><input className="input !min-h-0 w-20" inputMode="decimal" value={p.throughHoleMm ?? ''} onChange={(e) => setPin(i, { throughHoleMm: e.target.value === '' ? undefined : Number(e.target.value) })} /></td>
                      <td><button type="button" className="btn btn-quiet !min-h-0 !py-1" onClick={() => setPins((ps) => ps.filter((_, k) => k !== i))} disabled={pins.length <= 1} aria-label={`Remove pin ${i + 1}`}>×</button></td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <div className="flex flex-wrap gap-3">
              <button type="button" className="btn btn-quiet" onClick={() => setPins((ps) => [...ps, blankPin()])}>Add a pin</button>
              <button className="btn" type="submit" disabled={addCustom.isPending}>Save the accessory</button>
            </div>
            {addCustom.isError && <p role="alert" className="field-error">{errorText(addCustom.error)}</p>}
          </form>
        </section>
      )}
    </div>
  );
}
