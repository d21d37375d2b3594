/// <reference path="../.astro/types.d.ts" />

declare namespace App {
  interface Locals {
    user: import('./lib/server/sessions').SessionUser | null;
    session: import('./lib/server/sessions').ActiveSession | null;
    /** Why a session cookie stopped working on this request (idle, absolute, disabled), for the sign-in notice. */
    sessionEnded?: 'idle' | 'absolute' | 'disabled';
    /** How this request's sign-in was checked (lib/server/request-auth.ts); test and demo builds say it in a header. */
    signInCheck?: 'statement' | 'full';
  }
}

interface ImportMetaEnv {
  /** true in demo and test builds (TIDEMARK_BUILD=demo): dev mailbox, demo files, test hooks. */
  readonly TIDEMARK_DEMO: boolean;
  /** true in every other build: HSTS, no demo routes. */
  readonly TIDEMARK_PRODUCTION: boolean;
}
