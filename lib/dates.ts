/**
 * The one rule for showing an instant (stored as integer ms since the epoch, UTC): every surface — web pages, the
 * shared page, the PDF, mail, export file names — writes it in UTC and says so. The server and the browser then
 * render the same text (a page rendered on the server in one zone and hydrated in another never disagrees), and a
 * helper reading a shared report or a mail in another time zone reads the same clock as the sender.
 */

/** An instant as `2026-12-09 14:05 UTC` (minutes, 24-hour clock). */
export function formatUtc(at: number | Date): string {
  return `${new Date(at).toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** The UTC day of an instant as `2026-12-09` (ISO 8601 calendar date). */
export function formatUtcDay(at: number | Date): string {
  return new Date(at).toISOString().slice(0, 10);
}
