import { z } from '../analysis/zod';
import { MIN_PASSWORD_LENGTH } from '../constants';
import { roles } from '../permissions';

const email = z.string().trim().toLowerCase().min(1, 'Enter an e-mail address.').max(254).email('Enter a valid e-mail address.');
const newPassword = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(256, 'Use at most 256 characters.');

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

export const InvitationInput = z.object({ email, role: z.enum(roles) });

/** A change to one membership, from the Members page: a new role, or removal from the team. */
export const MembershipChangeInput = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('role'), userId: z.string().min(1).max(64), role: z.enum(roles) }),
  z.object({ intent: z.literal('remove'), userId: z.string().min(1).max(64) }),
]);
