/**
 * Renders a season description written in Markdown (lib/seasons/markdown) as React elements.
 * No HTML string is ever injected, so whatever the text holds is shown as text.
 */
import { Fragment, type ReactNode } from 'react';
import { parseMarkdown, type Inline } from '@/lib/seasons/markdown';

function inline(nodes: Inline[]): ReactNode[] {
  return nodes.map((n, i) => {
    switch (n.type) {
      case 'text':
        return <Fragment key={i}>{n.text}</Fragment>;
      case 'code':
        return <code key={i} className="rounded bg-ink-100 px-1 font-mono text-sm">{n.text}</code>;
      case 'strong':
        return <strong key={i}>{inline(n.children)}</strong>;
      case 'em':
        return <em key={i}>{inline(n.children)}</em>;
      case 'link':
        return n.href.startsWith('/')
          ? <a key={i} href={n.href}>{inline(n.children)}</a>
          : <a key={i} href={n.href} rel="nofollow noopener noreferrer" target="_blank">{inline(n.children)}</a>;
    }
  });
}

export function Markdown({ source, className }: { source: string; className?: string }) {
  const blocks = parseMarkdown(source);
  return (
    <div className={`space-y-3 ${className ?? ''}`} data-testid="markdown">
      {blocks.map((b, i) => {
        if (b.type === 'heading') {
          const H = (`h${b.level}`) as 'h2' | 'h3' | 'h4';
          return <H key={i} className="font-semibold">{inline(b.children)}</H>;
        }
        if (b.type === 'list') {
          const L = b.ordered ? 'ol' : 'ul';
          return <L key={i} className={`${b.ordered ? 'list-decimal' : 'list-disc'} space-y-1 pl-6`}>{b.items.map((it, j) => <li key={j}>{inline(it)}</li>)}</L>;
        }
        return <p key={i}>{inline(b.children)}</p>;
      })}
    </div>
  );
}
