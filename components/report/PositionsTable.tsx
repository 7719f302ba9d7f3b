'use client';
/**
 * Every position of the report in one table (TanStack Table): sortable by any column, filtered by verdict,
 * family and panel, searched by label. Lengths are mm in the data and shown in the chosen unit.
 */
import { useMemo, useState } from 'react';
import {
  columnFilteringFeature,
  createColumnHelper,
  createFilteredRowModel,
  createSortedRowModel,
  rowSortingFeature,
  sortFn_alphanumeric,
  tableFeatures,
  useTable,
  type ColumnFiltersState,
  type SortingState,
} from '@tanstack/react-table';
import type { Report, Verdict } from '@/lib/geometry/contract';
import { MARKS, type Mark } from '@/lib/report/palette';
import { MARK_WORD, outOfSightWords, positionMark } from '@/lib/report/words';
import { formatLength, type LengthUnit } from '@/lib/report/units';
import { MarkChip } from './Mark';

export interface PositionRow {
  index: number;
  label: string;
  family: string;
  panel: string;
  verdict: Verdict;
  /** The position's mark: its verdict, or not in view (under the reference sheet or outside the photo). */
  mark: Mark;
  r: number | null;
  dx: number | null;
  dy: number | null;
  u: number | null;
  tol: number;
  /** Tolerance left: tol − r, mm (negative when out). */
  spare: number | null;
  hidden: boolean;
  /** Why a hidden position was not seen, in words (lib/report/hidden.ts); null when not hidden. */
  notSeen: string | null;
  /** Hole-to-hole (form) verdict and deviation, mm; null when not measured or in a report made before them. */
  formVerdict: Verdict | null;
  formR: number | null;
}

export const VERDICT_FILTERS = {
  all: 'All verdicts',
  problems: `${MARK_WORD.out} or ${MARK_WORD.marginal.toLowerCase()}`,
  out: MARK_WORD.out,
  marginal: MARK_WORD.marginal,
  in: MARK_WORD.in,
  missing: MARK_WORD.missing,
  hidden: MARK_WORD.hidden,
} as const;
export type VerdictFilter = keyof typeof VERDICT_FILTERS;

const features = tableFeatures({
  columnFilteringFeature,
  rowSortingFeature,
  filteredRowModel: createFilteredRowModel(),
  sortedRowModel: createSortedRowModel(),
  sortFns: { alphanumeric: sortFn_alphanumeric },
});
const helper = createColumnHelper<typeof features, PositionRow>();
const VERDICT_RANK: Record<Verdict, number> = { out: 0, marginal: 1, in: 2, missing: 3 };
const numSort = (a: number | null, b: number | null) => (a === null ? (b === null ? 0 : 1) : b === null ? -1 : a - b);

export function positionRows(report: Report): PositionRow[] {
  return report.positions.map((p, index) => ({
    index,
    label: p.label,
    family: p.family,
    panel: p.panel ?? '—',
    verdict: p.verdict,
    mark: positionMark(p),
    r: p.deviation?.r ?? null,
    dx: p.deviation?.dx ?? null,
    dy: p.deviation?.dy ?? null,
    u: p.uncertaintyMm,
    tol: p.toleranceMm,
    spare: p.deviation ? p.toleranceMm - p.deviation.r : null,
    hidden: !!p.hidden,
    notSeen: outOfSightWords(p),
    formVerdict: p.form?.verdict ?? null,
    formR: p.form?.r ?? null,
  }));
}

const PAGE = 200;

export function PositionsTable({ rows, unit, selected, onSelect, initialVerdict = 'all' }: { rows: PositionRow[]; unit: LengthUnit; selected?: string | null; onSelect?: (label: string) => void; initialVerdict?: VerdictFilter }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'verdict', desc: false }]);
  const [filters, setFilters] = useState<ColumnFiltersState>(initialVerdict === 'all' ? [] : [{ id: 'verdict', value: initialVerdict }]);
  const [limit, setLimit] = useState(PAGE);
  const len = (v: number | null, signed = false) => (v === null ? '—' : formatLength(v, unit, { signed, suffix: false }));

  const columns = useMemo(() => helper.columns([
    helper.accessor('label', { header: 'Position', filterFn: (row, id, value: string) => row.getValue<string>(id).toLowerCase().includes(value.trim().toLowerCase()), sortFn: 'alphanumeric' }),
    helper.accessor('verdict', {
      header: 'Whole bed',
      filterFn: (row, _id, value: VerdictFilter) => {
        const m = row.original.mark;
        return value === 'all' || (value === 'problems' ? m === 'out' || m === 'marginal' : m === value);
      },
      sortFn: (a, b, id) => VERDICT_RANK[a.getValue<Verdict>(id)] - VERDICT_RANK[b.getValue<Verdict>(id)],
      cell: (c) => <MarkChip mark={c.row.original.mark} />,
    }),
    helper.accessor('formVerdict', {
      header: 'Hole to hole',
      sortFn: (a, b, id) => (VERDICT_RANK[a.getValue<Verdict | null>(id) ?? 'missing']) - (VERDICT_RANK[b.getValue<Verdict | null>(id) ?? 'missing']),
      cell: (c) => { const v = c.getValue(); return v ? <MarkChip mark={v} /> : '—'; },
    }),
    helper.accessor('formR', { header: `Off hole to hole, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue()) }),
    helper.accessor('r', { header: `Off, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue()) }),
    helper.accessor('spare', { header: `Spare, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue(), true) }),
    helper.accessor('dx', { header: `X, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue(), true) }),
    helper.accessor('dy', { header: `Y, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue(), true) }),
    helper.accessor('u', { header: `±1σ, ${unit}`, sortFn: (a, b, id) => numSort(a.getValue(id), b.getValue(id)), cell: (c) => len(c.getValue()) }),
    helper.accessor('tol', { header: `Allowed, ${unit}`, cell: (c) => len(c.getValue()) }),
    helper.accessor('family', { header: 'Family', filterFn: (row, id, value: string) => row.getValue<string>(id) === value }),
    helper.accessor('panel', { header: 'Panel', filterFn: (row, id, value: string) => row.getValue<string>(id) === value }),
  // eslint-disable-next-line react-hooks/exhaustive-deps
  ]), [unit]);

  const table = useTable({
    features,
    columns,
    data: rows,
    state: { sorting, columnFilters: filters },
    onSortingChange: setSorting,
    onColumnFiltersChange: setFilters,
  });

  const families = useMemo(() => [...new Set(rows.map((r) => r.family))].sort(), [rows]);
  const panels = useMemo(() => [...new Set(rows.map((r) => r.panel))].sort(), [rows]);
  const get = (id: string) => (filters.find((f) => f.id === id)?.value as string | undefined) ?? '';
  const set = (id: string, value: string) => {
    setLimit(PAGE);
    setFilters((prev) => [...prev.filter((f) => f.id !== id), ...(value && value !== 'all' ? [{ id, value }] : [])]);
  };
  const shown = table.getRowModel().rows;

  return (
    <div className="flex flex-col gap-3">
      <div className="no-print grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4">
        <label className="field">
          <span>Verdict</span>
          <select className="input" value={get('verdict') || 'all'} onChange={(e) => set('verdict', e.target.value)} data-testid="filter-verdict">
            {Object.entries(VERDICT_FILTERS).map(([k, v]) => <option key={k} value={k}>{v}</option>)}
          </select>
        </label>
        {([['family', 'Family', 'All families', families], ['panel', 'Panel', 'All panels', panels]] as const).map(([id, label, all, values]) => (
          <label key={id} className="field">
            <span>{label}</span>
            <select className="input" value={get(id)} onChange={(e) => set(id, e.target.value)}>
              <option value="">{all}</option>
              {values.map((f) => <option key={f} value={f}>{f}</option>)}
            </select>
          </label>
        ))}
        <label className="field">
          <span>Find a position</span>
          <input className="input" type="search" placeholder="e.g. C7" value={get('label')} onChange={(e) => set('label', e.target.value)} />
        </label>
      </div>
      <p className="text-sm text-muted" aria-live="polite" data-testid="positions-count">
        {shown.length} of {rows.length} positions shown. Tap a heading to sort. “Whole bed” judges each position against the whole lattice, its overall size and squareness included; “hole to hole” once they are taken out, which is what a fixture spanning part of the bed feels. “Spare” is the tolerance left; below zero the position is out.
      </p>
      <div className="gp-table-scroll max-h-[70vh] overflow-auto rounded-lg border border-line">
        <table className="w-full border-collapse text-left" data-testid="positions-table">
          <thead className="sticky top-0 bg-card">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id} className="border-b-2 border-line">
                {g.headers.map((h) => {
                  const dir = h.column.getIsSorted();
                  return (
                    <th key={h.id} className="p-0" aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : 'none'}>
                      <button type="button" className="gp-sortable min-h-12 w-full whitespace-nowrap px-3 text-left font-bold" onClick={h.column.getToggleSortingHandler()}>
                        <table.FlexRender header={h} />
                        <span aria-hidden="true">{dir === 'asc' ? ' ▲' : dir === 'desc' ? ' ▼' : ''}</span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="font-mono text-base">
            {shown.slice(0, limit).map((row) => {
              const sel = selected === row.original.label;
              return (
                <tr key={row.id} className={`border-b border-line ${sel ? 'bg-warn-bg' : ''}`} onClick={onSelect ? () => onSelect(row.original.label) : undefined} data-verdict={row.original.verdict}>
                  {row.getAllCells().map((c) => (
                    <td key={c.id} className="whitespace-nowrap px-3 py-2"><table.FlexRender cell={c} /></td>
                  ))}
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {shown.length > limit && (
        <button type="button" className="btn btn-quiet no-print self-start" onClick={() => setLimit(shown.length)}>Show all {shown.length} positions</button>
      )}
      {rows.some((r) => r.mark === 'hidden') && (
        <p className="text-sm text-muted" data-testid="hidden-note">
          Not measured, neither in nor out, because only part of the hole could be seen or none of it:{' '}
          {[...new Set(rows.flatMap((r) => (r.notSeen ? [r.notSeen] : [])))].map((w) => `${rows.filter((r) => r.notSeen === w).length} ${w}`).join('; ')}. That is expected; move the sheet or what covers them and take another photo to check them.
        </p>
      )}
      <p className="sr-only">{Object.values(MARKS).map((m) => `${m.label}: ${m.meaning}.`).join(' ')}</p>
    </div>
  );
}
