// Route × role table: what every route answers to every kind of visitor. It sits beside the permission matrix
// (src/lib/permissions.ts, unit-tested in tests/unit/lib/permissions.test.ts) and is checked against the built app by
// tests/integration/route-table.test.ts, which enumerates the routes from the file system: a route on disk without
// an entry here fails, and so does an entry here without a route.
//
// Adding a route: add one line per method. Pages (.astro) are listed for GET and POST (forms post to the page itself);
// endpoints (.ts) for each HTTP method they export. Keys are "<METHOD> <pattern>", the pattern as Astro derives it
// from the file name ([param] kept). Dynamic params are filled with fixture rows: {teamId} and {studyId} of the
// actors' team, {otherTeamId} of the other team, {token} a live invitation or reset token, {file} a demo file.
//
// Each row gives, in this order, the outcome for:
//   operator   the site operator flag, member of no team
//   lead       lead of the team in the URL
//   analyst    analyst of that team
//   reviewer   reviewer of that team
//   signedOut  no session cookie
//   otherTeam  lead of another team (the most rights, in the wrong team)
// An outcome is a status code, or "<3xx> <location>" for a redirect (compared with the Location header URL-decoded,
// placeholders filled; a trailing * matches any rest). Requests carry no body for GET, an empty urlencoded form for
// a page POST and `{}` as JSON for an API POST: enough to pass the guards and reach validation (400), never to
// change anything.

export const actors = ['operator', 'lead', 'analyst', 'reviewer', 'signedOut', 'otherTeam'] as const;
export type Actor = (typeof actors)[number];
export type Outcome = number | string;
export interface Expected {
  outcomes: Record<Actor, Outcome>;
  /** The request ends the actor's session (sign-out): send it from a client signed in for this request alone. */
  endsSession?: boolean;
}

function row(operator: Outcome, lead: Outcome, analyst: Outcome, reviewer: Outcome, signedOut: Outcome, otherTeam: Outcome, options: Omit<Expected, 'outcomes'> = {}): Expected {
  return { outcomes: { operator, lead, analyst, reviewer, signedOut, otherTeam }, ...options };
}
const all = (outcome: Outcome, options: Omit<Expected, 'outcomes'> = {}) => row(outcome, outcome, outcome, outcome, outcome, outcome, options);
/** The redirect a page sends a signed-out visitor: to sign-in, then back. */
const signIn = (next: string) => `302 /sign-in?next=${next}`;
const signIn303 = (next: string) => `303 /sign-in?next=${next}`;

export const routeTable: Record<string, Expected> = {
  // Public pages (sign-in, password reset, invitations): anyone; a signed-in visitor to sign-in goes home.
  'GET /':                                       row('302 /admin', '302 /teams/{teamId}', '302 /teams/{teamId}', '302 /teams/{teamId}', '302 /sign-in', '302 /teams/{otherTeamId}'),
  'POST /':                                      row('302 /admin', '302 /teams/{teamId}', '302 /teams/{teamId}', '302 /teams/{teamId}', '302 /sign-in', '302 /teams/{otherTeamId}'),
  'GET /sign-in':                                row('302 /', '302 /', '302 /', '302 /', 200, '302 /'),
  'POST /sign-in':                               all(400),
  'POST /sign-out':                              all('303 /sign-in?notice=signed-out', { endsSession: true }),
  'GET /forgot-password':                        all(200),
  'POST /forgot-password':                       all(400),
  'GET /invitations/[token]':                    all(200),
  'POST /invitations/[token]':                   all(400),
  'GET /reset-password/[token]':                 all(200),
  'POST /reset-password/[token]':                all(400),

  // Site administration: the operator flag only; a team role never opens it.
  'GET /admin':                                  row(200, 403, 403, 403, signIn('/admin'), 403),
  'POST /admin':                                 row(400, 403, 403, 403, signIn('/admin'), 403),
  'GET /admin/teams':                            row(200, 403, 403, 403, signIn('/admin/teams'), 403),
  'POST /admin/teams':                           row(400, 403, 403, 403, signIn('/admin/teams'), 403),
  'GET /admin/audit':                            row(200, 403, 403, 403, signIn('/admin/audit'), 403),
  'POST /admin/audit':                           row(405, 403, 403, 403, signIn('/admin/audit'), 403),

  // Team pages: members only (404 to anyone else, operator included), then the role's rights.
  'GET /teams/[teamId]':                         row(404, 200, 200, 200, signIn('/teams/{teamId}'), 404),
  'POST /teams/[teamId]':                        row(404, 400, 403, 403, signIn('/teams/{teamId}'), 404),
  'GET /teams/[teamId]/members':                 row(404, 200, 200, 200, signIn('/teams/{teamId}/members'), 404),
  'POST /teams/[teamId]/members':                row(404, 400, 403, 403, signIn('/teams/{teamId}/members'), 404),
  'POST /teams/[teamId]/membership':             row(404, '303 /teams/{teamId}/members?problem=*', 403, 403, signIn303('/teams/{teamId}/members'), 404),
  'GET /teams/[teamId]/studies/[studyId]':       row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}'), 404),
  'POST /teams/[teamId]/studies/[studyId]':      row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}'), 404),
  'GET /teams/[teamId]/studies/[studyId]/workspace':  row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/workspace'), 404),
  'POST /teams/[teamId]/studies/[studyId]/workspace': row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/workspace'), 404),
  'GET /teams/[teamId]/studies/[studyId]/sessions/[sessionId]':  row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/sessions/{sessionId}'), 404),
  'POST /teams/[teamId]/studies/[studyId]/sessions/[sessionId]': row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/sessions/{sessionId}'), 404),
  'GET /teams/[teamId]/studies/[studyId]/cohort':  row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/cohort'), 404),
  'POST /teams/[teamId]/studies/[studyId]/cohort': row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/cohort'), 404),
  'GET /teams/[teamId]/studies/[studyId]/cohort/report':  row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/cohort/report'), 404),
  'POST /teams/[teamId]/studies/[studyId]/cohort/report': row(404, 200, 200, 200, signIn('/teams/{teamId}/studies/{studyId}/cohort/report'), 404),

  // One's own account (password, sessions): any signed-in person; the empty form names no action (400).
  'GET /account':                                row(200, 200, 200, 200, signIn('/account'), 200),
  'POST /account':                               row(400, 400, 400, 400, signIn('/account'), 400),

  // JSON API: 401 signed out, 404 outside one's teams, 403 for the role, 400 for the empty body.
  'GET /api/me':                                 row(200, 200, 200, 200, 401, 200),
  // The workspace's sign-in watch: status (401 with the reason when signed out), sign in again (anyone; `{}` is
  // 400 before any account is looked at), keep alive.
  'GET /api/session':                            row(200, 200, 200, 200, 401, 200),
  'POST /api/session':                           all(400),
  'POST /api/session/keep':                      row(200, 200, 200, 200, 401, 200),
  'GET /api/studies/[studyId]':                  row(404, 200, 200, 200, 401, 404),
  'GET /api/studies/[studyId]/analysis-sessions':  row(404, 200, 200, 200, 401, 404),
  'POST /api/studies/[studyId]/analysis-sessions': row(404, 403, 400, 403, 401, 404),
  'GET /api/teams/[teamId]/studies':             row(404, 200, 200, 200, 401, 404),
  'POST /api/teams/[teamId]/studies':            row(404, 400, 403, 403, 401, 404),

  // Team review (issue 11). {sessionId}: a session the fixture analyst owns, with version {number} = 1, its summary,
  // and {noteId}, a note the reviewer wrote. The empty `{}` body reaches validation (400) only for a role that may act.
  'GET /api/studies/[studyId]/subjects':         row(404, 200, 200, 200, 401, 404),
  'POST /api/studies/[studyId]/subjects':        row(404, 403, 400, 403, 401, 404),
  'POST /api/studies/[studyId]/summary-imports': row(404, 415, 415, 403, 401, 404),
  'GET /api/studies/[studyId]/cohort':            row(404, 200, 200, 200, 401, 404),
  'GET /api/studies/[studyId]/cohort/summaries':  row(404, 200, 200, 200, 401, 404),
  'GET /api/studies/[studyId]/cohort/covariates': row(404, 200, 200, 200, 401, 404),
  'PUT /api/studies/[studyId]/cohort/covariates': row(404, 400, 400, 403, 401, 404),
  'GET /api/studies/[studyId]/cohort/design':     row(404, 200, 200, 200, 401, 404),
  'PUT /api/studies/[studyId]/cohort/design':     row(404, 400, 403, 403, 401, 404),
  // Slope check reports (issue 15).
  'GET /api/studies/[studyId]/slope-reports':     row(404, 200, 200, 200, 401, 404),
  'POST /api/studies/[studyId]/slope-reports':    row(404, 400, 400, 403, 401, 404),
  'GET /api/analysis-sessions/[sessionId]':      row(404, 200, 200, 200, 401, 404),
  'GET /api/analysis-sessions/[sessionId]/recipe-versions':  row(404, 200, 200, 200, 401, 404),
  'POST /api/analysis-sessions/[sessionId]/recipe-versions': row(404, 403, 400, 403, 401, 404),
  'GET /api/analysis-sessions/[sessionId]/recipe-versions/[number]':         row(404, 200, 200, 200, 401, 404),
  'GET /api/analysis-sessions/[sessionId]/recipe-versions/[number]/summary': row(404, 200, 200, 200, 401, 404),
  'PUT /api/analysis-sessions/[sessionId]/recipe-versions/[number]/summary': row(404, 403, 400, 403, 401, 404),
  'POST /api/analysis-sessions/[sessionId]/status':      row(404, 400, 400, 403, 401, 404),
  'GET /api/analysis-sessions/[sessionId]/signatures':   row(404, 200, 200, 200, 401, 404),
  'POST /api/analysis-sessions/[sessionId]/signatures':  row(404, 400, 403, 403, 401, 404),
  'GET /api/analysis-sessions/[sessionId]/notes':        row(404, 200, 200, 200, 401, 404),
  'POST /api/analysis-sessions/[sessionId]/notes':       row(404, 400, 400, 400, 401, 404),
  'GET /api/notes/[noteId]':                     row(404, 200, 200, 200, 401, 404),
  'PATCH /api/notes/[noteId]':                   row(404, 403, 403, 400, 401, 404),
  'POST /api/notes/[noteId]/replies':            row(404, 400, 400, 400, 401, 404),
  'PUT /api/notes/[noteId]/resolution':          row(404, 400, 400, 400, 401, 404),
  'GET /api/teams/[teamId]/members':             row(404, 200, 200, 200, 401, 404),
  // Anyone signed in chooses their own review mail; an empty post (no form marker) is refused and changes nothing.
  'GET /account/notifications':                  row(200, 200, 200, 200, signIn('/account/notifications'), 200),
  'POST /account/notifications':                 row(400, 400, 400, 400, signIn('/account/notifications'), 400),

  // Demo build only (astro.config.mjs injects these from src/demo-routes; the production build has neither). The
  // mailbox answers loopback clients while the mail fake runs, signed in or not (the test client is on loopback).
  'GET /dev/mailbox':                            all(200),
  'POST /dev/mailbox':                           all(200),
  'GET /demo/[file]':                            row(200, 200, 200, 200, 401, 200),
};
