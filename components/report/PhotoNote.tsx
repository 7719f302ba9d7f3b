/**
 * The report's plain note that its photo had problems and its figures carry them (words: lib/report/photo-note.ts).
 * Pure, so the shared page renders it on the server with its verdict.
 */
export function PhotoNote({ note }: { note: string | null }) {
  if (!note) return null;
  return <p className="rounded-xl border-2 border-l-8 border-warn bg-warn-bg p-4 font-bold leading-snug text-warn" data-testid="photo-note" role="note">{note}</p>;
}
