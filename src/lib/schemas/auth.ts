import { z } from '../analysis/zod';
import { MIN_PASSWORD_LENGTH } from '../constants';
import { roles } from '../permissions';
import { isCommonPassword } from '../server/common-passwords';

const email = z.string().trim().toLowerCase().min(1, 'Enter an e-mail address.').max(254).email('Enter a valid e-mail address.');
/**
 * A new password, per NIST SP 800-63B §5.1.1.2: at least MIN_PASSWORD_LENGTH characters (NIST's floor is 8), at most
 * 256, no composition rules (any characters, spaces included), and not on the list of commonly used or leaked
 * passwords. The one schema behind the reset, invitation and change-password forms.
 */
export const NewPassword = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(256, 'Use at most 256 characters.')
  .refine((p) => !isCommonPassword(p), {
    message: 'This password is on a list of commonly used or leaked passwords, so it is among the first an attacker would try. Choose another: several unrelated words work well.',
  });
const newPassword = NewPassword;

export const SignInInput = z.object({
  email,
  password: z.string().min(1, 'Enter your password.').max(256),
});

export const ForgotPasswordInput = z.object({ email });

export const ResetPasswordInput = z
  .object({ password: newPassword, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export const AcceptInvitationInput = z
  .object({ displayName: z.string().trim().min(1, 'Enter your name.').max(120), password: newPassword, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

/**
 * Joining a team with an account that already exists: `password` is that account's current password, checked against
 * its hash, so the new-password rules do not apply to it.
 */
export const AcceptInvitationExistingInput = z
  .object({ displayName: z.string().trim().max(120), password: z.string().min(1, 'Enter the current password of your account.').max(256), confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

/** The Account page's change-password form. */
export const ChangePasswordInput = z
  .object({
    intent: z.literal('change-password'),
    current: z.string().min(1, 'Enter your current password.').max(256),
    password: newPassword,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

/** Every form of the Account page, told apart by `intent`: change the password, end all other sessions, or one. */
export const AccountFormInput = z.discriminatedUnion('intent', [
  ChangePasswordInput,
  z.object({ intent: z.literal('end-others') }),
  z.object({ intent: z.literal('end-one'), session: z.string().regex(/^[0-9a-f]{64}$/, 'That is not a session of this account.') }),
]);

/** The workspace's sign-in-again dialog (JSON): `expectedUserId` is the person whose work the open page holds. */
export const SessionSignInInput = z.object({
  email,
  password: z.string().min(1, 'Enter your password.').max(256),
  expectedUserId: z.string().min(1).max(64).optional(),
});

export const InvitationInput = z.object({ email, role: z.enum(roles) });

/** A change to one membership, from the Members page: a new role, or removal from the team. */
export const MembershipChangeInput = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('role'), userId: z.string().min(1).max(64), role: z.enum(roles) }),
  z.object({ intent: z.literal('remove'), userId: z.string().min(1).max(64) }),
]);
