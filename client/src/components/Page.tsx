import { useEffect, type ReactNode } from 'react';

interface PageHeadingProps {
  title: string;
  /** A sentence under the heading: what this page is for. */
  intro?: ReactNode;
  /** Buttons or links that belong to the whole page. */
  actions?: ReactNode;
}

function PageHeading({ title, intro, actions }: PageHeadingProps) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div className="min-w-0">
        <h1 className="text-3xl font-bold leading-tight">{title}</h1>
        {intro ? <p className="mt-2 max-w-prose text-ink-soft">{intro}</p> : null}
      </div>
      {actions ? <div className="flex flex-wrap gap-3">{actions}</div> : null}
    </header>
  );
}

interface PageProps extends PageHeadingProps {
  children: ReactNode;
  /** The browser tab's title; the page title when not given. */
  documentTitle?: string;
}

/** The shell of every page: sets the tab title, shows the heading, then the content. */
export function Page({ title, intro, actions, documentTitle, children }: PageProps) {
  useDocumentTitle(documentTitle ?? title);
  return (
    <div>
      <PageHeading title={title} intro={intro} actions={actions} />
      <div className="flex flex-col gap-6">{children}</div>
    </div>
  );
}

export function useDocumentTitle(title: string) {
  useEffect(() => {
    document.title = `${title} · Brink`;
  }, [title]);
}

interface PanelProps {
  title: string;
  /** h2 by default; h3 inside a section that already has an h2. */
  level?: 2 | 3;
  children: ReactNode;
  actions?: ReactNode;
}

/** A titled box of content on the paper ground. */
export function Panel({ title, level = 2, children, actions }: PanelProps) {
  const Heading = level === 2 ? 'h2' : 'h3';
  return (
    <section className="rounded-lg border border-rule bg-sheet p-5 shadow-sm">
      <div className="mb-3 flex flex-wrap items-center justify-between gap-3">
        <Heading className={level === 2 ? 'text-xl font-bold' : 'text-lg font-semibold'}>{title}</Heading>
        {actions}
      </div>
      <div className="flex flex-col gap-3">{children}</div>
    </section>
  );
}
