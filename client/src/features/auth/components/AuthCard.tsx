import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import { useDocumentTitle } from '@client/components/Page';

/** The narrow sheet that holds the sign-in, password and invitation forms. */
export function AuthCard({ title, intro, children }: { title: string; intro?: ReactNode; children: ReactNode }) {
  useDocumentTitle(title);
  return (
    <div className="mx-auto w-full max-w-md rounded-lg border border-rule bg-sheet p-6 shadow-sm sm:p-8">
      <h1 className="text-2xl font-bold leading-tight">{title}</h1>
      {intro ? <div className="mt-2 text-ink-soft">{intro}</div> : null}
      <div className="mt-6 flex flex-col gap-5">{children}</div>
    </div>
  );
}

/** Only local paths are followed after sign-in, so a link cannot send someone to another site. */
export function safeNextPath(next: string | null): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/';
}

export function BackToSignIn() {
  return (
    <p>
      <Link to="/sign-in">Back to sign in</Link>
    </p>
  );
}
