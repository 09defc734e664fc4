import { Fragment } from 'react';
import { Page } from '@client/components/Page';
import { Button } from '@client/components/Button';
import { LoadError, Loading } from '@client/components/Status';
import { isApiError } from '@client/lib/api';
import { deviceTimeZone, formatSiteTime } from '@shared/time/shifts';
import { useCaughtMail, type CaughtMessage } from '../api/mail';

/** Makes the links in a plain-text message clickable; the rest stays text. */
function TextWithLinks({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <a key={i} href={part} className="break-all">
            {part}
          </a>
        ) : (
          <Fragment key={i}>{part}</Fragment>
        ),
      )}
    </>
  );
}

function recipients(to: CaughtMessage['to']) {
  return Array.isArray(to) ? to.join(', ') : to;
}

/** Mail caught by the local mail catcher, newest first. Local and test set-ups only. */
export function MailPage() {
  const mail = useCaughtMail();
  const messages = [...(mail.data ?? [])].sort((a, b) => Date.parse(b.date) - Date.parse(a.date));
  return (
    <Page
      title="Caught mail"
      intro="On this local set-up, Brink's e-mails stop here instead of going out."
      actions={
        <Button variant="secondary" busy={mail.isFetching} busyText="Checking…" onClick={() => mail.refetch()}>
          Check for new mail
        </Button>
      }
    >
      {mail.isPending ? <Loading what="Loading caught mail" /> : null}
      {mail.isError && isApiError(mail.error, 404) ? <p>The mail catcher is off on this server, so mail goes out as normal.</p> : null}
      {mail.isError && !isApiError(mail.error, 404) ? <LoadError error={mail.error} retry={() => mail.refetch()} /> : null}
      {mail.isSuccess && messages.length === 0 ? <p>No mail caught yet.</p> : null}
      <ol className="flex flex-col gap-4">
        {messages.map((m) => (
          <li key={m.id} className="rounded-lg border border-rule bg-sheet p-5 shadow-sm">
            <h2 className="text-lg font-bold">{m.subject || '(no subject)'}</h2>
            <p className="text-ink-soft">
              To <span className="break-all text-ink">{recipients(m.to)}</span> · {formatSiteTime(m.date, deviceTimeZone())}
            </p>
            <pre className="mt-3 whitespace-pre-wrap break-words font-sans">
              <TextWithLinks text={m.text} />
            </pre>
          </li>
        ))}
      </ol>
    </Page>
  );
}
