// Escaping for text and attribute values placed in the report's HTML (HTML Living Standard, §13.1:
// & < > in text; " and ' too, so the same function is safe inside quoted attributes).
const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

/** Escape, then turn our [[bold]] marks (report-notices.ts) into <strong>. */
export function escapeWithStrong(text: string): string {
  return escapeHtml(text).replace(/\[\[(.+?)\]\]/g, '<strong>$1</strong>');
}
