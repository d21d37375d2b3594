import { z } from '../analysis/zod';

const email = z.string().trim().toLowerCase().min(1, 'Enter an e-mail address.').max(254).email('Enter a valid e-mail address.');

/** One change to one account, from the People page. */
export const AccountChangeInput = z.object({
  intent: z.enum(['grantOperator', 'revokeOperator', 'suspend', 'reactivate'], 'Choose one of the offered changes.'),
  userId: z.string().min(1, 'Choose an account.').max(64),
});

/** A new team and the e-mail of its first lead, from the Teams page. */
export const NewTeamInput = z.object({
  name: z.string().trim().min(1, 'Enter a team name.').max(80, 'Use at most 80 characters.'),
  leadEmail: email,
});

/** The site audit's filter and page: an action prefix such as "site." or "session.signIn", and a keyset cursor. */
export const AuditQuery = z.object({
  action: z
    .string()
    .trim()
    .max(60, 'Use at most 60 characters.')
    .regex(/^[A-Za-z.]*$/, 'An action prefix has letters and dots only, like "site." or "session.signIn".')
    .optional(),
  before: z.coerce.number().int('Use a whole event number.').positive('Use an event number above 0.').optional(),
});
