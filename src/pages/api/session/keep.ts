/**
 * POST /api/session/keep: "keep me signed in" from the workspace's expiry notice. The request itself is the activity
 * (the middleware restarts the idle clock for any request but GET /api/session); it answers like GET /api/session.
 * It cannot stretch the absolute limit.
 */
import type { APIRoute } from 'astro';
import { route } from '../../../lib/server/http';
import { sessionStatus } from '../../../lib/server/session-status';

export const POST: APIRoute = (ctx) => route(ctx, sessionStatus);
