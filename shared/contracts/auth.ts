import * as z from 'zod';
import { ROLES } from './roles.ts';

/** Request and response shapes of sign-in, invitations, members and API tokens, shared by server and client. */

export const emailSchema = z.string().trim().toLowerCase().pipe(z.email('Enter a valid e-mail address.')).pipe(z.string().max(254));

/** At least 10 characters: long enough to resist guessing at the rate limit, short enough to type at a bench. */
export const newPasswordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');

export const loginBody = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type LoginBody = z.infer<typeof loginBody>;

export const roleSchema = z.enum(ROLES);

export const invitationBody = z.object({ email: emailSchema, role: roleSchema });
export type InvitationBody = z.infer<typeof invitationBody>;

export const acceptInvitationBody = z.object({
  /** For a new account; ignored when the e-mail already has an account (then `password` must be its password). */
  name: z.string().trim().min(1, 'Enter your name.').max(200).optional(),
  password: z.string().min(1).max(200),
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationBody>;

export const memberRoleBody = z.object({ role: roleSchema });

/** Change password (account page): the current one, and a new one under the same rule as sign-up. */
export const changePasswordBody = z
  .object({
    currentPassword: z.string('Type your current password.').min(1, 'Type your current password.').max(1024),
    newPassword: newPasswordSchema,
    /** Also revoke every personal API token (scripts stop until given a new one). @default false */
    alsoRevokeTokens: z.boolean().default(false),
  })
  .refine((b) => b.newPassword !== b.currentPassword, { path: ['newPassword'], message: 'Choose a password different from your current one.' });
export type ChangePasswordBody = z.input<typeof changePasswordBody>;

/** Sign out everywhere: every browser session of the account, this one too; tokens only when asked. */
export const signOutEverywhereBody = z.object({
  /** Also revoke every personal API token. @default false */
  alsoRevokeTokens: z.boolean().default(false),
});
export type SignOutEverywhereBody = z.input<typeof signOutEverywhereBody>;

/** "Forgot password?": the address to send a reset link to. */
export const passwordResetRequestBody = z.object({ email: emailSchema });
export type PasswordResetRequestBody = z.infer<typeof passwordResetRequestBody>;

/** Setting a new password with the secret from a reset e-mail. */
export const passwordResetCompleteBody = z.object({
  token: z.string('The reset link is incomplete: open it again from the e-mail.').min(16, 'The reset link is incomplete: open it again from the e-mail.').max(200),
  password: newPasswordSchema,
});
export type PasswordResetCompleteBody = z.infer<typeof passwordResetCompleteBody>;

/** `POST /api/auth/password-reset/check`: is a reset link still open? Looks only; the link stays usable. */
export const passwordResetCheckBody = passwordResetCompleteBody.pick({ token: true });
export type PasswordResetCheckBody = z.infer<typeof passwordResetCheckBody>;

/** The one answer to a reset request, whether or not the address has an account. */
export const PASSWORD_RESET_REQUESTED_MESSAGE =
  'If an account uses that address, a link to set a new password is on its way. It works once and expires soon; check your spam folder if it does not arrive.';

export const apiTokenBody = z.object({
  name: z.string().trim().min(1, 'Name the token after the script that uses it.').max(100),
  /** Days until the token stops working; omit for a token that lasts until revoked. */
  expiresInDays: z.number().int().min(1).max(366).optional(),
  /** The account's password, typed again: a token outlives the session, so it is made only by its owner in person. */
  password: z.string('Type your password to confirm.').min(1, 'Type your password to confirm.').max(1024),
});
export type ApiTokenBody = z.infer<typeof apiTokenBody>;

const campaignFields = {
  name: z.string().trim().min(1, 'Name the campaign.').max(200),
  description: z.string().max(5000),
  startedOn: z.iso.date().nullable(),
  /** The launcher tube's length, m (null: not logged). */
  tubeLengthM: z.number('The tube length must be a number (m).').positive('The tube length must be greater than 0.').max(100, 'The tube length looks wrong (over 100 m).').nullable(),
  /** The launcher tube's bore (inner diameter), m. */
  boreM: z.number('The bore must be a number (m).').positive('The bore must be greater than 0.').max(1, 'The bore looks wrong (over 1 m).').nullable(),
};

export const campaignBody = z.object({
  name: campaignFields.name,
  description: campaignFields.description.default(''),
  startedOn: campaignFields.startedOn.optional(),
  tubeLengthM: campaignFields.tubeLengthM.optional(),
  boreM: campaignFields.boreM.optional(),
});
export type CampaignBody = z.infer<typeof campaignBody>;

/** A correction: any subset of the fields. */
export const campaignPatchBody = z
  .object(campaignFields)
  .partial()
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change: send at least one field.');
export type CampaignPatchBody = z.infer<typeof campaignPatchBody>;

export interface MembershipView {
  labId: string;
  labName: string;
  labSlug: string;
  role: z.infer<typeof roleSchema>;
}

export interface MeView {
  user: { id: string; email: string; name: string };
  memberships: MembershipView[];
  /** How this request was signed in. */
  via: 'session' | 'token';
  /** Session expiry (ISO time), when signed in through the browser. */
  expiresAt: string | null;
}

/** Every error the API sends has this shape. */
export interface ApiErrorBody {
  error: { code: string; message: string; details?: unknown };
}
