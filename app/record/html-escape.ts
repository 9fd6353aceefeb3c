/**
 * Escaping for text placed in HTML/SVG. Every string that came from the store
 * or an instrument goes through here; escaping all five of & < > " ' makes the
 * result safe both in element content and in quoted attribute values
 * (HTML Living Standard §13.1.2.6 and §13.2.4, common practice).
 */
const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(text: string): string {
  return String(text).replace(/[&<>"']/g, (c) => ESCAPES[c]);
}
