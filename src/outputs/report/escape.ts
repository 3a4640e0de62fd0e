/**
 * Escaping of text placed in the report's HTML. Every string that did not come from the
 * report's own templates (region and file names, prior descriptions and sources, warnings,
 * option values, CSV fields) goes through {@link escapeHtml} before it touches the page.
 */

const ENTITIES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/**
 * Escapes text for HTML element content and for quoted attribute values alike.
 *
 * @remarks Escaping `& < > " '` is what the HTML standard requires for text and quoted
 * attributes (WHATWG HTML, "Serializing HTML fragments", escaping a string); control
 * characters other than tab, line feed and carriage return are dropped, since HTML forbids
 * them in documents.
 *
 * @example escapeHtml('<b>"x" & y</b>') === '&lt;b&gt;&quot;x&quot; &amp; y&lt;/b&gt;'
 */
export function escapeHtml(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g, '').replace(/[&<>"']/g, (c) => ENTITIES[c]);
}
