import { useMemo } from 'react';
import MarkdownIt from 'markdown-it';
import { cn } from '../../../lib/cn';

// Raw HTML is off: a form's text can never inject markup or script into the page.
const md = new MarkdownIt({ html: false, linkify: false, typographer: false });

/** A form's Markdown text, rendered safely. */
export function Markdown({ source, className }: { source: string; className?: string }) {
  const html = useMemo(() => md.render(source), [source]);
  return (
    <div
      className={cn(
        'text-[17px] leading-relaxed text-ink [&_h1]:mt-6 [&_h1]:text-2xl [&_h1]:font-semibold [&_h2]:mt-6 [&_h2]:mb-2 [&_h2]:text-xl [&_h2]:font-semibold [&_h3]:mt-4 [&_h3]:font-semibold [&_li]:my-1 [&_ol]:list-decimal [&_ol]:pl-6 [&_p]:my-3 [&_strong]:font-semibold [&_ul]:list-disc [&_ul]:pl-6',
        className,
      )}
      dangerouslySetInnerHTML={{ __html: html }}
    />
  );
}
