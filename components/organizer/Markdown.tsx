/**
 * Renders a season description or rulebook text written in Markdown, with react-markdown +
 * rehype-sanitize (policy in lib/seasons/markdown.ts). Headings start at h2 (the page has its h1);
 * links that are not http(s), mailto or a path on this site are shown as plain text.
 */
import ReactMarkdown, { type Components } from 'react-markdown';
import rehypeSanitize from 'rehype-sanitize';
import { MARKDOWN_MAX_CHARS, MARKDOWN_SANITIZE_SCHEMA } from '@/lib/seasons/markdown';
import { safeLinkHref } from '@/lib/security/urls';

const heading = (Tag: 'h2' | 'h3' | 'h4'): Components['h1'] =>
  function Heading({ children }) {
    return <Tag className="font-semibold">{children}</Tag>;
  };

const COMPONENTS: Components = {
  h1: heading('h2'),
  h2: heading('h3'),
  h3: heading('h4'),
  h4: heading('h4'),
  h5: heading('h4'),
  h6: heading('h4'),
  ul: ({ children }) => <ul className="list-disc space-y-1 pl-6">{children}</ul>,
  ol: ({ children }) => <ol className="list-decimal space-y-1 pl-6">{children}</ol>,
  code: ({ children }) => <code className="rounded bg-ink-100 px-1 font-mono text-sm">{children}</code>,
  a: ({ href, children }) => {
    const safe = href ? safeLinkHref(href) : null;
    if (!safe) return <span>{children}</span>;
    if (safe.startsWith('/') || safe.startsWith('#')) return <a href={safe}>{children}</a>;
    return <a href={safe} rel="nofollow noopener noreferrer" target="_blank">{children}</a>;
  },
};

/** react-markdown's own URL filter runs first; ours (in `a`) decides what stays a link. */
const urlTransform = (url: string) => safeLinkHref(url) ?? '';

export function Markdown({ source, className }: { source: string; className?: string }) {
  return (
    <div className={`space-y-3 ${className ?? ''}`} data-testid="markdown">
      <ReactMarkdown skipHtml rehypePlugins={[[rehypeSanitize, MARKDOWN_SANITIZE_SCHEMA]]} components={COMPONENTS} urlTransform={urlTransform}>
        {source.slice(0, MARKDOWN_MAX_CHARS)}
      </ReactMarkdown>
    </div>
  );
}
