/**
 * The words of the e-mails the server sends. Plain text only: it reads well in every client
 * and the links stay visible.
 */
import type { ProjectRole } from '@contracts/roles';

const ROLE_WORDS: Record<ProjectRole, string> = {
  owner: 'an owner (full control, including members)',
  editor: 'an editor (can change designs)',
  viewer: 'a viewer (can read and export)',
};

export function invitationMail(p: { link: string; projectName: string; inviterName: string; role: ProjectRole; expiresAt: Date }) {
  return {
    subject: `Invitation to "${p.projectName}" on Tetrawell`,
    text: [
      `${p.inviterName} invited you to join the project "${p.projectName}" on Tetrawell as ${ROLE_WORDS[p.role]}.`,
      '',
      'Open this link to accept (sign in or create an account with this e-mail address first):',
      p.link,
      '',
      `The link works once and expires on ${p.expiresAt.toUTCString()}.`,
      'If you did not expect this invitation, ignore this message.',
    ].join('\n'),
  };
}

export function passwordResetMail(p: { link: string; displayName: string; expiresAt: Date }) {
  return {
    subject: 'Reset your Tetrawell password',
    text: [
      `Hello ${p.displayName},`,
      '',
      'Someone (hopefully you) asked to reset the password of your Tetrawell account. Open this link to choose a new one:',
      p.link,
      '',
      `The link works once and expires on ${p.expiresAt.toUTCString()}.`,
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ].join('\n'),
  };
}

/**
 * `repeatOf`: the address already had an unconfirmed account from an earlier sign-up. The link then confirms
 * that account as it is (its first password and name); the mail says so and where to set a password of one's own.
 */
export function emailVerificationMail(p: { link: string; displayName: string; expiresAt: Date; repeatOf?: { resetLink: string } }) {
  const repeat = p.repeatOf
    ? [
        '',
        'This address already had an account waiting for confirmation from an earlier sign-up. The link confirms that account with the password chosen at the first sign-up; a later sign-up changes nothing.',
        `If that password is not yours (or you have forgotten it), open the link and then ask for a password reset here: ${p.repeatOf.resetLink}`,
      ]
    : [];
  return {
    subject: 'Confirm your e-mail address for Tetrawell',
    text: [
      `Hello ${p.displayName},`,
      '',
      'Someone (hopefully you) created a Tetrawell account with this e-mail address. Open this link to confirm the address and sign in:',
      p.link,
      ...repeat,
      '',
      `The link works once and expires on ${p.expiresAt.toUTCString()}.`,
      'If you did not sign up, ignore this message: the account stays unusable without this link.',
    ].join('\n'),
  };
}

/** Sent to the owner of an address that already has an account when someone signs up with it again. */
export function signUpAttemptMail(p: { signInLink: string; resetLink: string; displayName: string }) {
  return {
    subject: 'Someone tried to create a Tetrawell account with your address',
    text: [
      `Hello ${p.displayName},`,
      '',
      'Someone (perhaps you) just tried to create a Tetrawell account with this e-mail address, which already has one. No second account was made and nothing about yours changed.',
      '',
      'To use your account, sign in here:',
      p.signInLink,
      '',
      'Forgotten the password? Ask for a reset link here:',
      p.resetLink,
      '',
      'If it was not you, you can ignore this message.',
    ].join('\n'),
  };
}

/** A long job ended (issue 10): sent to the person who started it when their job-mail switch is on. */
export function jobEndedMail(p: {
  displayName: string;
  jobId: number;
  kind: string;
  designName: string;
  designVersion: number;
  state: 'succeeded' | 'failed';
  error: string | null;
  seconds: number;
  link: string;
}) {
  const took = p.seconds >= 120 ? `${(p.seconds / 60).toFixed(1)} min` : `${Math.round(p.seconds)} s`;
  return {
    subject: p.state === 'succeeded' ? `Tetrawell job ${p.jobId} finished (${p.kind})` : `Tetrawell job ${p.jobId} failed (${p.kind})`,
    text: [
      `Hello ${p.displayName},`,
      '',
      p.state === 'succeeded'
        ? `Your ${p.kind} job ${p.jobId} on "${p.designName}" (version ${p.designVersion}) finished after ${took}.`
        : `Your ${p.kind} job ${p.jobId} on "${p.designName}" (version ${p.designVersion}) failed after ${took}: ${p.error ?? 'no reason was recorded'}`,
      'See it here:',
      p.link,
      '',
      'Computed figures are estimates from the model; confirm them with your group\'s own validated methods before a fabrication or design decision.',
      'You get this e-mail because job e-mails are switched on in your account settings; switch them off there.',
    ].join('\n'),
  };
}
