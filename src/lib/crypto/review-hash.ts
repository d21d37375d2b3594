/**
 * What a signature is bound to (after 21 CFR Part 11 §11.70, signature/record linking): SHA-256 (FIPS 180-4) over
 * the RFC 8785 JSON Canonicalization Scheme form of the session, the recipe version (number and recipe) and that
 * version's summary (null when none was uploaded). Anyone holding the same JSON can recompute it with any JCS
 * implementation and `sha256sum`; DEVELOPERS.md ("Signature manifest") gives the exact object.
 */
import { canonicalJson, sha256Hex } from './audit-chain';

export const SIGNED_CONTENT_FORMAT = 'tidemark-signed-content-1';
export const CANONICALIZATION = 'RFC 8785 JCS, SHA-256';

export interface SignedContent {
  analysisSessionId: string;
  fingerprint: string | null;
  recipeVersion: number;
  recipe: unknown;
  summary: unknown | null;
}

export function signedContentForm(c: SignedContent): Record<string, unknown> {
  return {
    format: SIGNED_CONTENT_FORMAT,
    analysisSessionId: c.analysisSessionId,
    fingerprint: c.fingerprint,
    recipeVersion: c.recipeVersion,
    recipe: c.recipe,
    summary: c.summary,
  };
}

export function signedContentHash(c: SignedContent): string {
  return sha256Hex(canonicalJson(signedContentForm(c)));
}

/** SHA-256 of one JSON value's JCS form (recipe_versions.recipe_hash, summaries.summary_hash). */
export function jsonHash(value: unknown): string {
  return sha256Hex(canonicalJson(value));
}
