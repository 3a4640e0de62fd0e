/**
 * The page shell shared by every kind of report: document head (strict content security
 * policy: no script may run and nothing may be fetched), style sheet, masthead, contents and
 * sections. Pages differ only in their masthead and their list of sections.
 */
import { html, Html } from './html.js';
import type { Section } from './section.js';
import { STYLES } from './styles.js';

/**
 * The page forbids every script and every fetch: `default-src 'none'` covers scripts, fonts,
 * images, frames and connections; only the inline style sheet (and style attributes) and
 * inline data images are allowed. Even a mistake in escaping could then run nothing.
 */
export const CONTENT_SECURITY_POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";

export interface PageParts {
  /** the document title (browser tab, printed header) */
  title: string;
  masthead: Html;
  sections: readonly Section[];
  footer: Html;
}

export function renderPage(p: PageParts): string {
  const contents = html`<nav class="contents" aria-label="Contents"><ol>${p.sections.map((s) => html`<li><a href="#${s.id}">${s.title}</a></li>`)}</ol></nav>`;
  const body = p.sections.map((s) => html`<section id="${s.id}" aria-labelledby="${s.id}-title"><h2 id="${s.id}-title">${s.title}</h2>${s.body}</section>`);
  return html`<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${CONTENT_SECURITY_POLICY}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="referrer" content="no-referrer">
<title>${p.title}</title>
<style>${Html.trusted(STYLES)}</style>
</head>
<body>
<div class="page">
<header class="masthead">${p.masthead}</header>
${contents}
<main>
${body}
</main>
<footer>${p.footer}</footer>
</div>
</body>
</html>
`.text;
}
