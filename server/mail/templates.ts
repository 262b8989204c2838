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

export function emailVerificationMail(p: { link: string; displayName: string; expiresAt: Date }) {
  return {
    subject: 'Confirm your e-mail address for Tetrawell',
    text: [
      `Hello ${p.displayName},`,
      '',
      'Someone (hopefully you) created a Tetrawell account with this e-mail address. Open this link to confirm the address and sign in:',
      p.link,
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
