import { Link, useNavigate, useParams } from 'react-router';
import { GateShell } from '../../components/AppShell';
import { FormAlert } from '../../components/Form';
import { Loading } from '../../components/QueryState';
import { ROLE_LABELS } from '../../components/RoleBadge';
import { ApiError } from '../../lib/api';
import { withNext } from '../../lib/nextPath';
import { useMe } from '../auth/me';
import { useSignOut } from '../auth/signOut';
import { useAcceptInvitation } from './acceptInvitation';
import { useInvitationPreview } from './previewInvitation';

const linkClass = 'font-semibold text-phosphor-700 underline-offset-2 hover:underline';

export function AcceptInvitationPage() {
  const { token = '' } = useParams();
  const here = `/invite/${encodeURIComponent(token)}`;
  const preview = useInvitationPreview(token);
  const me = useMe();
  const accept = useAcceptInvitation();
  const signOut = useSignOut();
  const navigate = useNavigate();

  if (preview.isPending || me.isPending) {
    return (
      <GateShell title="Invitation">
        <Loading label="Reading the invitation…" />
      </GateShell>
    );
  }
  if (preview.isError) {
    const gone = preview.error instanceof ApiError && (preview.error.status === 404 || preview.error.status === 410);
    return (
      <GateShell title="Invitation unavailable">
        <FormAlert message={gone ? 'This invitation link is not valid any more: it expired, was revoked or was already used. Ask the project owner to send a new one.' : preview.error.message} />
        <Link to="/projects" className={`mt-4 inline-block ${linkClass}`}>
          Go to your projects
        </Link>
      </GateShell>
    );
  }

  const inv = preview.data;
  const user = me.data ?? null;
  const sameAddress = user ? user.email.toLowerCase() === inv.email.toLowerCase() : false;

  return (
    <GateShell title={`Join “${inv.projectName}”`} lead={`${inv.invitedBy} invited ${inv.email} as ${ROLE_LABELS[inv.role].label.toLowerCase()} (${ROLE_LABELS[inv.role].summary}).`}>
      {!user && (
        <div className="space-y-3 text-body text-wafer-700">
          <p>
            Sign in as <strong>{inv.email}</strong> to accept, or create an account with that address first.
          </p>
          <div className="flex flex-wrap gap-4">
            <Link to={withNext('/sign-in', here, { email: inv.email })} className={linkClass}>
              Sign in to accept
            </Link>
            <Link to={withNext('/sign-up', here, { email: inv.email })} className={linkClass}>
              Create an account
            </Link>
          </div>
        </div>
      )}
      {user && !sameAddress && (
        <div className="space-y-3 text-body text-wafer-700">
          <FormAlert tone="info" message={`You are signed in as ${user.email}, but this invitation is for ${inv.email}.`} />
          <button
            type="button"
            className={linkClass}
            onClick={() => signOut.mutate(undefined, { onSettled: () => navigate(withNext('/sign-in', here, { email: inv.email })) })}
          >
            Sign out and continue as {inv.email}
          </button>
        </div>
      )}
      {user && sameAddress && (
        <div className="space-y-4">
          <FormAlert message={accept.error ? (accept.error instanceof ApiError ? accept.error.message : 'Could not accept the invitation.') : null} />
          <button
            type="button"
            disabled={accept.isPending}
            onClick={() => accept.mutate(token, { onSuccess: (projectId) => navigate(projectId ? `/projects/${projectId}` : '/projects', { replace: true }) })}
            className="rounded-md bg-phosphor-700 px-4 py-2 text-note font-semibold text-white hover:bg-phosphor-800 disabled:opacity-60 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-phosphor-500"
          >
            {accept.isPending ? 'Joining…' : 'Accept and open the project'}
          </button>
        </div>
      )}
    </GateShell>
  );
}
