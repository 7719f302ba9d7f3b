/** Gridproof's mark: a square frame around a 3 × 3 lattice of holes, drawn in the current text colour. */
export function BrandMark() {
  return (
    <svg width="28" height="28" viewBox="0 0 28 28" aria-hidden="true">
      <rect x="1.5" y="1.5" width="25" height="25" rx="4" fill="none" stroke="currentColor" strokeWidth="3" />
      {[8, 14, 20].map((x) => [8, 14, 20].map((y) => <circle key={`${x}-${y}`} cx={x} cy={y} r="2" fill="currentColor" />))}
    </svg>
  );
}
