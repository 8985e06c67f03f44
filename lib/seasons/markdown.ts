/**
 * Markdown in season descriptions and rulebooks: the limits and the sanitizing policy. Rendering is
 * react-markdown (components/organizer/Markdown.tsx): it never passes raw HTML through (no
 * rehype-raw), and rehype-sanitize with the schema below keeps only the elements listed (no images:
 * they would load from other sites; no raw HTML, iframes or forms). Link targets go through
 * safeLinkHref (lib/security/urls.ts): http(s), mailto, or a path on this site.
 * Client-safe.
 */
import { defaultSchema, type Options as SanitizeSchema } from 'rehype-sanitize';

/** Bounds keep a hostile description from costing much. */
export const MARKDOWN_MAX_CHARS = 20_000;

/** The only elements Markdown may produce here (GitHub's sanitize schema, narrowed further). */
export const MARKDOWN_ELEMENTS = ['p', 'br', 'strong', 'em', 'del', 'code', 'pre', 'blockquote', 'ul', 'ol', 'li', 'a', 'h1', 'h2', 'h3', 'h4', 'h5', 'h6', 'hr'];

export const MARKDOWN_SANITIZE_SCHEMA: SanitizeSchema = {
  ...defaultSchema,
  tagNames: MARKDOWN_ELEMENTS,
  attributes: { a: ['href'] },
  protocols: { href: ['http', 'https', 'mailto'] },
  clobberPrefix: 'md-',
};
