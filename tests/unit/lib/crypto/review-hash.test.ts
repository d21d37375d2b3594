import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { asJsonValue, canonicalJson, chainedForm, CHAIN_GENESIS, eventHash, firstBreak, holedText } from '../../../../src/lib/crypto/audit-chain';
import { signedContentHash } from '../../../../src/lib/crypto/review-hash';

describe('canonical JSON (RFC 8785, JSON Canonicalization Scheme)', () => {
  it('matches the RFC\'s own example (RFC 8785 §3.2.3, "Sorting of Object Properties" input and §3.2.4 output)', () => {
    // The input and expected output of RFC 8785 §3.2.2–§3.2.4, written as JS values.
    const input = {
      numbers: [333333333.33333329, 1e30, 4.5, 2e-3, 0.000000000000000000000000001],
      string: '\u20ac$\u000F\u000aA\'\u0042\u0022\u005c\\"/',
      literals: [null, true, false],
    };
    expect(canonicalJson(input)).toBe('{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],"string":"€$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}');
  });

  it('sorts keys by UTF-16 code units (RFC 8785 §3.2.3) and drops no key that has a value', () => {
    expect(canonicalJson({ b: 1, a: { d: [1, 2], c: null }, '\u20ac': 0, '\r': 1 })).toBe('{"\\r":1,"a":{"c":null,"d":[1,2]},"b":1,"€":0}');
  });

  it('refuses NaN and Infinity, which JSON cannot hold', () => {
    expect(() => canonicalJson({ x: Number.NaN })).toThrow();
    expect(() => canonicalJson([Number.POSITIVE_INFINITY])).toThrow();
  });
});

describe('signed content hash', () => {
  const base = { analysisSessionId: 's1', fingerprint: 'f'.repeat(64), recipeVersion: 2, recipe: { a: 1, b: [1, 2] }, summary: null };
  it('is the SHA-256 (checked with node:crypto directly) of the JCS form, whatever the key order', () => {
    const expected = createHash('sha256')
      .update('{"analysisSessionId":"s1","fingerprint":"' + 'f'.repeat(64) + '","format":"tidemark-signed-content-1","recipe":{"a":1,"b":[1,2]},"recipeVersion":2,"summary":null}')
      .digest('hex');
    expect(signedContentHash(base)).toBe(expected);
    expect(signedContentHash({ ...base, recipe: { b: [1, 2], a: 1 } })).toBe(expected);
  });
  it('changes with the version number, the recipe and the summary', () => {
    const h = signedContentHash(base);
    expect(signedContentHash({ ...base, recipeVersion: 3 })).not.toBe(h);
    expect(signedContentHash({ ...base, recipe: { a: 1.0000001, b: [1, 2] } })).not.toBe(h);
    expect(signedContentHash({ ...base, summary: {} })).not.toBe(h);
  });
});

describe('audit hash chain', () => {
  const at = new Date('2026-12-02T06:00:00.123Z');
  const make = (n: number) => {
    const rows: { id: number; teamId: string; actorId: string; action: string; targetTable: string; targetId: string; detail: unknown; at: Date; prevHash: string; hash: string }[] = [];
    let prev = CHAIN_GENESIS;
    for (let i = 1; i <= n; i++) {
      const fields = { id: i * 10, teamId: 't', actorId: 'u', action: 'note.create', targetTable: 'notes', targetId: `n${i}`, detail: { i }, at, prevHash: prev };
      const hash = eventHash(fields);
      rows.push({ ...fields, hash });
      prev = hash;
    }
    return rows;
  };
  it('holds for an untouched chain', () => {
    expect(firstBreak(make(4))).toBeNull();
  });
  it('names an edited event by id', () => {
    const rows = make(4);
    rows[2].detail = { i: 99 };
    expect(firstBreak(rows)).toMatchObject({ eventId: 30, problem: expect.stringContaining('edited') });
  });
  it('names the event after a removed one', () => {
    const rows = make(4);
    rows.splice(1, 1);
    expect(firstBreak(rows)).toMatchObject({ eventId: 30, problem: expect.stringContaining('prev_hash') });
  });
  it('names an event whose hash was blanked', () => {
    const rows = make(3) as { hash: string | null }[];
    rows[1].hash = null;
    expect(firstBreak(rows as never)).toMatchObject({ eventId: 20 });
  });
});

describe('the hashed text cut at the values PostgreSQL fills in (time, id, previous hash, team and detail members)', () => {
  const text = fc.string({ unit: 'binary', maxLength: 12 });
  // Details as routes make them, and hostile ones: markers of another cut (another nonce), nested `at`/`id`/`prevHash`.
  const other = holedText().mark;
  const detail = fc.oneof(
    fc.jsonValue(),
    fc.record({ at: fc.constant(other('at')), id: fc.constant(other('id')), prevHash: fc.constant(other('prevHash')), x: text }),
    fc.record({ detail: fc.record({ id: fc.constant(other('id')), prevHash: fc.constant(other('prevHash')) }) }),
  );
  it('cut at its holes and joined with the values\' JSON text, is exactly the RFC 8785 text eventHash hashes (fast-check, 500 cases)', () => {
    fc.assert(
      fc.property(
        fc.record({
          teamId: fc.option(fc.uuid(), { nil: null }),
          actorId: fc.option(fc.uuid(), { nil: null }),
          action: text,
          targetTable: text,
          targetId: text,
          detail: detail.map((d) => asJsonValue(d)),
          id: fc.integer({ min: 1, max: Number.MAX_SAFE_INTEGER }),
          at: fc.date({ min: new Date('2000-01-01T00:00:00Z'), max: new Date('2999-12-31T23:59:59.999Z'), noInvalidDate: true }),
          prevHash: fc.oneof(fc.constant(CHAIN_GENESIS), fc.stringMatching(/^[0-9a-f]{64}$/)),
        }),
        (e) => {
          // The holes PostgreSQL fills in when it stores an event (db/queries/audit.ts): time, id, previous hash,
          // and for the note post the team id and two detail members read in the same statement.
          const { mark, pieces: cut } = holedText();
          const holed = { ...e, detail: { ...(e.detail as object), studyId: mark('detail.studyId'), subjectCode: mark('detail.subjectCode') } };
          const form = { ...chainedForm(holed), teamId: mark('teamId'), at: mark('at'), id: mark('id'), prevHash: mark('prevHash') };
          const { pieces, holes } = cut(form);
          const full = { ...e, detail: { ...(e.detail as object), studyId: e.teamId ?? 'st-1', subjectCode: 'TM-S"01\\x' } };
          const value: Record<string, string> = {
            at: JSON.stringify(e.at.toISOString()), id: String(e.id), prevHash: JSON.stringify(e.prevHash), teamId: JSON.stringify(e.teamId),
            'detail.studyId': JSON.stringify(full.detail.studyId), 'detail.subjectCode': JSON.stringify(full.detail.subjectCode),
          };
          expect(holes.slice().sort()).toEqual(Object.keys(value).sort());
          const joined = pieces.map((p, i) => p + (i < holes.length ? value[holes[i]] : '')).join('');
          expect(joined).toBe(canonicalJson(chainedForm(full)));
        },
      ),
      { numRuns: 500 },
    );
  });
});
