/**
 * The list of commonly used and leaked passwords that new passwords are checked against, as NIST SP 800-63B
 * §5.1.1.2 asks ("passwords obtained from previous breach corpuses", "dictionary words", "commonly-used"): the
 * `passwords-common` dictionary of @zxcvbn-ts/language-common (about 49,000 entries from public breach corpora,
 * all lower case), pinned in package.json. Server only: the schemas in src/lib/schemas/auth.ts are used by pages and
 * API routes, and tests/integration/sessions.test.ts checks that no client bundle carries the list.
 */
import { dictionary } from '@zxcvbn-ts/language-common';

let list: Set<string> | null = null;

/** Built on first use, once per server process. */
function commonPasswords(): Set<string> {
  list ??= new Set(dictionary['passwords-common']);
  return list;
}

/**
 * True when `password` is on the list. The comparison ignores letter case (the list is lower case, and "Password123"
 * is as guessable as "password123") and applies Unicode NFKC, as §5.1.1.2 recommends before any comparison.
 */
export function isCommonPassword(password: string): boolean {
  return commonPasswords().has(password.normalize('NFKC').toLowerCase());
}

export function commonPasswordCount(): number {
  return commonPasswords().size;
}
