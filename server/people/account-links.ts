import type { AppContext } from '../platform/app-context';
import type { User } from './db';
import { issueUserToken } from './tokens-db';
import { ROLE_LABELS, ROLE_SUMMARIES } from '../platform/roles';

/** E-mails a one-time password-reset link that expires after RESET_LINK_MINUTES. */
export async function sendPasswordResetLink(ctx: AppContext, user: Pick<User, 'id' | 'name' | 'email' | 'organisationId'>) {
  const minutes = ctx.config.RESET_LINK_MINUTES;
  const token = await issueUserToken(ctx.db, user.id, 'reset', minutes * 60_000);
  const link = `${ctx.config.PUBLIC_URL}/password/reset/${token}`;
  await ctx.mailer.send({
    organisationId: user.organisationId,
    to: user.email,
    secrets: [link],
    subject: 'Crowntip: choose a new password',
    text: [
      `Hello ${user.name},`,
      '',
      'Someone (we hope you) asked to reset your Crowntip password. Open this link to choose a new one:',
      link,
      '',
      `The link works once and expires in ${minutes} minutes. If you did not ask for it, ignore this message; your password stays as it is.`,
    ].join('\n'),
  });
  return link;
}

/** E-mails an invitation with a one-time link to set a first password. */
export async function sendInvitation(
  ctx: AppContext,
  user: Pick<User, 'id' | 'name' | 'email' | 'organisationId' | 'role'>,
  invitedBy: Pick<User, 'name' | 'organisationName'>,
) {
  const hours = ctx.config.INVITE_LINK_HOURS;
  const token = await issueUserToken(ctx.db, user.id, 'invite', hours * 3600_000);
  const link = `${ctx.config.PUBLIC_URL}/invite/${token}`;
  await ctx.mailer.send({
    organisationId: user.organisationId,
    to: user.email,
    secrets: [link],
    subject: `Crowntip: ${invitedBy.name} invited you to ${invitedBy.organisationName}`,
    text: [
      `Hello ${user.name},`,
      '',
      `${invitedBy.name} has given you a Crowntip account at ${invitedBy.organisationName} as ${ROLE_LABELS[user.role]} (${ROLE_SUMMARIES[user.role]}).`,
      'Open this link to choose your password:',
      link,
      '',
      `The link works once and expires in ${hours} hours.`,
    ].join('\n'),
  });
  return link;
}
