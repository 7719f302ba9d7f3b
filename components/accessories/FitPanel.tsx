'use client';
/**
 * An accessory on a finished check: pick the accessory, the position its origin goes on and a turn → fits or
 * binds, the margin, the pins that bind and by how much; the map of every position and turn where it fits;
 * and a sacrificial board measured in its own check against this bed. Lengths arrive in mm (bed frame: origin
 * front-left, +X right, +Y away from the operator; the map draws the operator's side at the bottom).
 */
import { useMutation } from '@tanstack/react-query';
import { useMemo, useState } from 'react';
import { api, errorText } from '@/components/api';
import { formatAngle, formatLength, type LengthUnit } from '@/lib/report/units';
import { MAP_EDGE_WORDS } from '@/lib/report/words';

/**
 * `firstFamily`: the bed family id the accessory's first pin (its origin) enters; `firstAt`: the position offered
 * first for it (every pin on a measured hole, nearest the front-left corner), null when there is none.
 */
export interface FitAccessory { id: string; name: string; pinCount: number; firstFamily: string; firstAt: string | null }
export interface FitPosition { label: string; family: string; kind: string; x: number; y: number }
export interface BoardCheck { id: string; label: string }

type Turn = 0 | 90 | 180 | 270;
interface PinRow { index: number; label: string; hole: string; clearanceMm: number; errorMm: number; slackMm: number; binding: boolean; bindsByMm: number }
interface Placement { fits: boolean; marginMm: number; placement: { dx: number; dy: number; rotationDeg: number }; pins: PinRow[]; binding: string[] }
interface PlaceAnswer { mode: 'place'; result: Placement & { at: string; turnDeg: Turn } }
interface MapAnswer { mode: 'map'; cells: { at: string; turnDeg: Turn; status: 'fits' | 'binds' | 'unseen'; marginMm: number | null }[]; fits: number; binds: number; truncated: boolean }
interface BoardAnswer { mode: 'board'; result: Placement & { anchor: string; unpaired: string[]; paired: number } }

const TURNS: Turn[] = [0, 90, 180, 270];

function Outcome({ r, unit, what }: { r: Placement; unit: LengthUnit; what: string }) {
  const L = (mm: number, signed = false) => formatLength(mm, unit, { signed });
  return (
    <div className="flex flex-col gap-3" data-testid="fit-result">
      <p className={`rounded-lg border-4 p-3 text-xl font-bold ${r.fits ? 'border-pass bg-pass-bg text-pass' : 'border-fail bg-fail-bg text-fail'}`}>
        {r.fits ? `${what} fits, with ${L(r.marginMm)} to spare` : `${what} binds by ${L(-r.marginMm)}`}
      </p>
      <p className="text-muted">Best placement: shift X {L(r.placement.dx, true)}, Y {L(r.placement.dy, true)}, turn {formatAngle(r.placement.rotationDeg, { signed: true })} from where it sits nominally.{r.binding.length ? ` Deciding pins: ${r.binding.join(', ')}.` : ''}</p>
      <div className="overflow-x-auto">
        <table className="w-full text-left">
          <thead><tr className="border-b-2 border-line"><th className="py-2 pr-4">Pin</th><th className="pr-4">Hole</th><th className="pr-4">Clearance</th><th className="pr-4">Off centre</th><th className="pr-4">Spare</th><th>Binds by</th></tr></thead>
          <tbody>
            {r.pins.map((p) => (
              <tr key={p.index} className={`border-b border-line ${p.binding ? 'font-bold' : ''}`}>
                <td className="py-1 pr-4">{p.label}</td><td className="pr-4 font-mono">{p.hole}</td><td className="pr-4 font-mono">{L(p.clearanceMm)}</td>
                <td className="pr-4 font-mono">{L(p.errorMm)}</td><td className="pr-4 font-mono">{L(p.slackMm, true)}</td><td className="font-mono">{p.bindsByMm > 0 ? L(p.bindsByMm) : '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** Every position of the origin family at one turn: fits (disc), binds (square), hole not seen (ring). */
function FitMap({ positions, cells, turn, bed, unit, onPick }: { positions: FitPosition[]; cells: MapAnswer['cells']; turn: Turn; bed: { width: number; height: number }; unit: LengthUnit; onPick: (at: string) => void }) {
  const byAt = new Map(cells.filter((c) => c.turnDeg === turn).map((c) => [c.at, c]));
  const m = Math.max(bed.width, bed.height) * 0.03;
  const r = Math.max(bed.width, bed.height) / 90;
  return (
    <svg viewBox={`${-m} ${-m} ${bed.width + 2 * m} ${bed.height + 2 * m}`} className="w-full max-w-3xl rounded-lg border border-line bg-card" role="img" aria-label={`Where the accessory fits, turned ${turn}°`}>
      <rect x={0} y={0} width={bed.width} height={bed.height} fill="none" stroke="currentColor" strokeWidth={r / 4} />
      {positions.map((p) => {
        const c = byAt.get(p.label);
        const x = p.x, y = bed.height - p.y;
        const title = c ? `${p.label} at ${turn}°: ${c.status}${c.marginMm !== null ? ` (${c.marginMm >= 0 ? 'spare' : 'binds by'} ${formatLength(Math.abs(c.marginMm), unit)})` : ''}` : `${p.label}: a pin would miss the bed`;
        if (!c) return <circle key={p.label} cx={x} cy={y} r={r / 3} fill="var(--line)"><title>{title}</title></circle>;
        if (c.status === 'fits') return <circle key={p.label} cx={x} cy={y} r={r} fill="var(--pass)" className="cursor-pointer" onClick={() => onPick(p.label)} data-status="fits"><title>{title}</title></circle>;
        if (c.status === 'binds') return <rect key={p.label} x={x - r} y={y - r} width={2 * r} height={2 * r} fill="var(--fail)" className="cursor-pointer" onClick={() => onPick(p.label)} data-status="binds"><title>{title}</title></rect>;
        return <circle key={p.label} cx={x} cy={y} r={r} fill="none" stroke="var(--idle)" strokeWidth={r / 4}><title>{title}</title></circle>;
      })}
      <text x={0} y={-m * 0.2} fontSize={m * 0.7} fill="currentColor">{MAP_EDGE_WORDS.back}</text>
      <text x={0} y={bed.height + m * 0.8} fontSize={m * 0.7} fill="currentColor">{MAP_EDGE_WORDS.front}</text>
    </svg>
  );
}

export function FitPanel({ checkId, accessories, positions, bed, boards, unit: initialUnit }: { checkId: string; accessories: FitAccessory[]; positions: FitPosition[]; bed: { width: number; height: number }; boards: BoardCheck[]; unit: LengthUnit }) {
  const [unit, setUnit] = useState<LengthUnit>(initialUnit);
  const [accessoryId, setAccessoryId] = useState(accessories[0]?.id ?? '');
  const accessory = accessories.find((a) => a.id === accessoryId);
  const originPositions = useMemo(() => positions.filter((p) => !accessory || p.family === accessory.firstFamily), [positions, accessory]);
  const [at, setAt] = useState(accessory?.firstAt ?? originPositions[0]?.label ?? '');
  const [turn, setTurn] = useState<Turn>(0);
  const [mapTurn, setMapTurn] = useState<Turn>(0);
  const [boardId, setBoardId] = useState(boards[0]?.id ?? '');
  const [dc, setDc] = useState(0);
  const [dr, setDr] = useState(0);

  const place = useMutation({ mutationFn: (v: { at: string; turnDeg: Turn }) => api<PlaceAnswer>(`/api/checks/${checkId}/fit`, { body: { mode: 'place', accessoryId, ...v } }) });
  const map = useMutation({ mutationFn: () => api<MapAnswer>(`/api/checks/${checkId}/fit`, { body: { mode: 'map', accessoryId } }) });
  const board = useMutation({ mutationFn: () => api<BoardAnswer>(`/api/checks/${checkId}/fit`, { body: { mode: 'board', boardCheckId: boardId, dc, dr } }) });

  const pick = (label: string) => { setAt(label); setTurn(mapTurn); place.mutate({ at: label, turnDeg: mapTurn }); };
  const mapPositions = useMemo(() => positions.filter((p) => map.data?.cells.some((c) => c.at === p.label) || originPositions.includes(p)), [positions, map.data, originPositions]);

  return (
    <div className="flex flex-col gap-6">
      <fieldset className="no-print flex gap-2" aria-label="Units">
        {(['mm', 'in'] as const).map((u) => <button key={u} type="button" className={`btn ${unit === u ? '' : 'btn-quiet'}`} aria-pressed={unit === u} onClick={() => setUnit(u)}>{u === 'mm' ? 'mm' : 'inch'}</button>)}
      </fieldset>
      <section className="panel flex flex-col gap-4" aria-labelledby="place-h">
        <h2 id="place-h" className="text-xl font-bold">Does it fit here?</h2>
        {accessories.length === 0 ? <p>The workshop has no accessories yet. <a className="underline" href="/accessories">Add one to the library</a>.</p> : (
          <form className="grid grid-cols-1 gap-3 sm:grid-cols-3" onSubmit={(e) => { e.preventDefault(); place.mutate({ at, turnDeg: turn }); }}>
            <label className="field"><span>Accessory</span>
              <select className="input" value={accessoryId} onChange={(e) => { const next = accessories.find((a) => a.id === e.target.value); setAccessoryId(e.target.value); if (next?.firstAt) setAt(next.firstAt); map.reset(); place.reset(); }} data-testid="fit-accessory">
                {accessories.map((a) => <option key={a.id} value={a.id}>{a.name} ({a.pinCount} pin{a.pinCount === 1 ? '' : 's'})</option>)}
              </select>
            </label>
            <label className="field"><span>Its origin on</span>
              <select className="input font-mono" value={at} onChange={(e) => setAt(e.target.value)} data-testid="fit-at">
                {originPositions.map((p) => <option key={p.label} value={p.label}>{p.label}</option>)}
              </select>
            </label>
            <fieldset className="field"><span>Turned</span>
              <div className="flex flex-wrap gap-2">
                {TURNS.map((t) => <button key={t} type="button" className={`btn !px-3 ${turn === t ? '' : 'btn-quiet'}`} aria-pressed={turn === t} onClick={() => setTurn(t)}>{t}°</button>)}
              </div>
            </fieldset>
            <button className="btn self-start" type="submit" disabled={place.isPending || !accessoryId} data-testid="fit-run">{place.isPending ? 'Fitting…' : 'Check the fit'}</button>
          </form>
        )}
        {place.isError && <p role="alert" className="field-error">{errorText(place.error)}</p>}
        {place.data && <Outcome r={place.data.result} unit={unit} what={`${accessory?.name ?? 'The accessory'} on ${place.data.result.at} at ${place.data.result.turnDeg}°`} />}
      </section>

      {accessories.length > 0 && (
        <section className="panel flex flex-col gap-4" aria-labelledby="map-h">
          <h2 id="map-h" className="text-xl font-bold">Where does it fit?</h2>
          <p className="text-muted">Every position of the bed as the accessory&apos;s origin, at every turn. Green disc: fits; red square: binds; ring: a hole it needs was not seen in the photo. Tap one to see its pins.</p>
          <button type="button" className="btn self-start" onClick={() => map.mutate()} disabled={map.isPending} data-testid="fit-map-run">{map.isPending ? 'Working out every placement…' : 'Map every position and turn'}</button>
          {map.isError && <p role="alert" className="field-error">{errorText(map.error)}</p>}
          {map.data && (
            <>
              <p data-testid="fit-map-summary"><strong>{map.data.fits}</strong> placements fit, <strong>{map.data.binds}</strong> bind{map.data.truncated ? ' (the map was cut short: too many placements)' : ''}.</p>
              <div className="flex flex-wrap gap-2">
                {TURNS.map((t) => {
                  const n = map.data.cells.filter((c) => c.turnDeg === t && c.status === 'fits').length;
                  return <button key={t} type="button" className={`btn !px-3 ${mapTurn === t ? '' : 'btn-quiet'}`} aria-pressed={mapTurn === t} onClick={() => setMapTurn(t)}>{t}° · {n} fit</button>;
                })}
              </div>
              <FitMap positions={mapPositions} cells={map.data.cells} turn={mapTurn} bed={bed} unit={unit} onPick={pick} />
            </>
          )}
        </section>
      )}

      <section className="panel flex flex-col gap-4" aria-labelledby="board-h">
        <h2 id="board-h" className="text-xl font-bold">Does this board drop onto this bed?</h2>
        <p className="text-muted">Photograph the sacrificial board on its own as a check of its own bed (its pattern the same lattice as this bed&apos;s), then test it here. Say where its first hole lands: how many columns and rows from this bed&apos;s first hole.</p>
        {boards.length === 0 ? <p>No other finished check to test yet.</p> : (
          <form className="grid grid-cols-1 gap-3 sm:grid-cols-4" onSubmit={(e) => { e.preventDefault(); board.mutate(); }}>
            <label className="field sm:col-span-2"><span>The board&apos;s check</span>
              <select className="input" value={boardId} onChange={(e) => setBoardId(e.target.value)}>{boards.map((b) => <option key={b.id} value={b.id}>{b.label}</option>)}</select>
            </label>
            <label className="field"><span>Columns over</span><input className="input" type="number" step={1} value={dc} onChange={(e) => setDc(Math.trunc(Number(e.target.value) || 0))} /></label>
            <label className="field"><span>Rows up</span><input className="input" type="number" step={1} value={dr} onChange={(e) => setDr(Math.trunc(Number(e.target.value) || 0))} /></label>
            <button className="btn self-start" type="submit" disabled={board.isPending}>Test the board</button>
          </form>
        )}
        {board.isError && <p role="alert" className="field-error">{errorText(board.error)}</p>}
        {board.data && (
          <>
            <Outcome r={board.data.result} unit={unit} what={`The board (first hole on ${board.data.result.anchor})`} />
            {board.data.result.unpaired.length > 0 && <p className="text-muted">{board.data.result.unpaired.length} board holes meet no measured bed hole: {board.data.result.unpaired.slice(0, 12).join(', ')}{board.data.result.unpaired.length > 12 ? '…' : ''}.</p>}
          </>
        )}
      </section>
      <p className="text-sm text-muted">Before you try an accessory on the machine: spindle stopped and machine switched off. The machine maker&apos;s manual and your shop&apos;s rules come first.</p>
    </div>
  );
}
