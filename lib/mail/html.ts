/** HTML escaping for mail bodies: every user-given string goes through `escapeHtml` before it meets markup. */

const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;', '`': '&#96;' };

/** Escapes text for an HTML element body or a quoted attribute value. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"'`]/g, (c) => ENTITIES[c] ?? c);
}

/** Escapes text and keeps its line breaks as `<br>`. */
export function escapeMultiline(value: string): string {
  return escapeHtml(value.replace(/\r\n?/g, '\n')).replace(/\n/g, '<br>');
}

/** One line for a header such as Subject: control characters (CR, LF, …) become spaces. */
export function oneLine(value: string, maxLength = 200): string {
  const flat = value.replace(/[\u0000-\u001f\u007f]+/g, ' ').replace(/\s+/g, ' ').trim();
  return flat.length > maxLength ? `${flat.slice(0, maxLength - 1)}…` : flat;
}

/** A link is only ever http(s); anything else (javascript:, data:) is refused. */
export function safeHttpUrl(value: string): string {
  let url: URL;
  try {
    url = new URL(value);
  } catch {
    throw new Error(`not a URL: ${oneLine(value, 80)}`);
  }
  if (url.protocol !== 'https:' && url.protocol !== 'http:') throw new Error(`links must be http or https, not ${url.protocol}`);
  return url.toString();
}
