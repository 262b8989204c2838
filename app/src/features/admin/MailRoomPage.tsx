import { useState } from 'react';
import { canSite } from '@contracts/roles';
import { PageHeader } from '../../components/PageHeader';
import { usePageTitle } from '../../components/pageTitle';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { formatDateTime } from '../../lib/format';
import { useMe } from '../auth/me';
import { useCapturedMail } from './listMail';
import { splitLinks } from './linkify';

function MailText({ text }: { text: string }) {
  return (
    <pre className="whitespace-pre-wrap break-words rounded-md bg-wafer-50 p-3 font-mono text-fine text-wafer-800">
      {splitLinks(text).map((part, i) =>
        part.kind === 'text' ? (
          <span key={i}>{part.text}</span>
        ) : (
          <a key={i} href={part.href} className="text-phosphor-700 underline">
            {part.href}
          </a>
        ),
      )}
    </pre>
  );
}

function MailList() {
  const mail = useCapturedMail();
  const [openId, setOpenId] = useState<number | null>(null);
  if (mail.isPending) return <Loading label="Loading captured mail…" />;
  if (mail.isError) return <QueryError error={mail.error} what="captured mail" onRetry={() => void mail.refetch()} />;
  if (mail.data.length === 0) return <p className="text-note text-wafer-500">No messages caught yet. Invitations and password-reset e-mails appear here.</p>;
  return (
    <ul className="divide-y divide-wafer-100" aria-label="Captured messages">
      {mail.data.map((m) => {
        const open = openId === m.id;
        return (
          <li key={m.id} className="py-2">
            <button
              type="button"
              aria-expanded={open}
              aria-controls={`mail-${m.id}`}
              onClick={() => setOpenId(open ? null : m.id)}
              className="grid w-full grid-cols-[1fr_auto] gap-x-4 rounded-md px-2 py-1.5 text-left hover:bg-wafer-50 focus-visible:outline-2 focus-visible:outline-phosphor-500"
            >
              <span className="truncate font-semibold text-wafer-900">{m.subject || '(no subject)'}</span>
              <time dateTime={m.receivedAt} className="num text-fine text-wafer-500">
                {formatDateTime(m.receivedAt)}
              </time>
              <span className="col-span-2 truncate text-fine text-wafer-500">
                to {m.to.join(', ')} · from {m.from}
              </span>
            </button>
            {open && (
              <div id={`mail-${m.id}`} className="mt-2 px-2">
                <MailText text={m.text} />
              </div>
            )}
          </li>
        );
      })}
    </ul>
  );
}

export function MailRoomPage() {
  const me = useMe();
  usePageTitle('Mail room');
  if (!canSite(me.data?.siteRole, 'admin.mail.read')) {
    return <PageHeader title="Mail room" lead="Only site administrators can read captured mail." />;
  }
  return (
    <>
      <PageHeader
        title="Mail room"
        lead="Messages caught by the local stand-in mail server used in development and tests. With a real mail host configured, nothing lands here."
      />
      <Panel title="Captured messages" description="Newest first; refreshed every 15 seconds.">
        <MailList />
      </Panel>
    </>
  );
}
