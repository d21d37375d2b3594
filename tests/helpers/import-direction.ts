// The import-direction check (issue 10, item 2): imports flow one way (DEVELOPERS.md, "Architecture in one
// paragraph"). Every .ts/.tsx/.mjs/.astro file under `src/` and `workers/` of a root is parsed with TypeScript's own
// parser (`ts.createSourceFile`; an .astro file's frontmatter and <script> blocks), each relative import is resolved
// to a path under the root, and the rules below are applied to it. `tests/unit/import-direction.test.ts` runs it on
// the repository (must hold) and on a fixture folder with deliberately wrong imports (must fail, naming each).
import fs from 'node:fs';
import { builtinModules } from 'node:module';
import path from 'node:path';
import ts from 'typescript';

/** One import as written in a file. */
export interface ImportEdge {
  /** Importing file, relative to the root, with forward slashes. */
  file: string;
  line: number;
  specifier: string;
  /** The imported file relative to the root (no extension resolution: `src/lib/analysis/baseline`), or null for a package. */
  target: string | null;
  /** Imported names ('default', '*' for a namespace or `export *`); empty for a side-effect import. */
  names: string[];
  /** `import type …` / `export type …` / every named element `type`: erased by the compiler, no code is loaded. */
  typeOnly: boolean;
}

export interface Violation {
  file: string;
  line: number;
  specifier: string;
  rule: string;
}

/**
 * Pure helpers from `src/lib/analysis` a screen (`src/components/**`) may import by value: constants, label
 * predicates and the grid's rounding, none of which computes over samples. Anything else a screen needs from the
 * core comes through a store or the client layer.
 */
export const SCREEN_ANALYSIS_HELPERS: readonly { module: string; names: readonly string[] }[] = [
  { module: 'src/lib/analysis/channel-types', names: ['CHANNEL_TYPES', 'isBrainType'] },
  { module: 'src/lib/analysis/rounding', names: ['roundHalfUp'] },
  { module: 'src/lib/analysis/errors', names: ['AnalysisInputError'] },
  // zod set up without generated code (the page's CSP forbids eval); forms validate with the same instance.
  { module: 'src/lib/analysis/zod', names: ['z'] },
];

/**
 * TEMPORARY (issue 10, item 1): screen imports of the numeric core that exist today and that the workspace controller
 * (branch `controller`) removes. The check does not fail on an entry that no longer matches an import (it is simply
 * stale), so the controller work can drop imports before deleting lines here. Do not add to this list.
 */
export const PENDING_SCREEN_IMPORTS: readonly { file: string; module: string }[] = [
];

/** TEMPORARY: any other known upward import awaiting its fix (none today). Same staleness rule as above. */
export const PENDING_OTHER_IMPORTS: readonly { file: string; module: string }[] = [];

const CORE = ['src/lib/analysis/', 'src/lib/formats/', 'src/lib/statistics/'];
const NODE_BUILTINS = new Set(builtinModules);

const under = (p: string | null, prefixes: readonly string[]) => p !== null && prefixes.some((x) => p === x.replace(/\/$/, '') || p.startsWith(x));

/** Layers below which a folder must not reach: [importing folder, forbidden targets, why]. */
const FORBIDDEN: readonly [string, readonly string[], string][] = [
  ['src/db/', ['src/lib/server/', 'src/lib/client/', 'src/stores/', 'src/components/', 'src/pages/', 'src/layouts/', 'src/cli/', 'workers/'], 'src/db imports nothing above it (no lib/server, client, stores, screens, pages)'],
  ['workers/', ['src/components/', 'src/stores/', 'src/lib/client/', 'src/lib/server/', 'src/db/', 'src/pages/'], 'workers are wiring below lib/client: no screens, stores, client, server or db'],
  ['src/lib/client/', ['src/components/', 'src/stores/', 'src/pages/', 'src/lib/server/', 'src/db/'], 'lib/client sits below stores and screens, and is browser code (no server or db)'],
  ['src/stores/', ['src/components/', 'src/pages/', 'src/lib/server/', 'src/db/'], 'stores sit below screens, and are browser code (no server or db)'],
  ['src/lib/crypto/', ['src/lib/server/', 'src/db/', 'src/lib/client/', 'src/stores/', 'src/components/', 'src/pages/'], 'lib/crypto (hashes, tokens, ids, password hashing) sits below db and lib/server'],
  ['src/lib/plot/', ['src/components/', 'src/stores/', 'src/lib/client/', 'src/pages/', 'src/lib/server/', 'src/db/'], 'lib/plot is pure drawing below stores and screens'],
  ['src/components/', ['src/lib/server/', 'src/db/', 'src/pages/'], 'screens are browser code: no server, db or pages'],
];

function scriptsOf(file: string, text: string): { code: string; lineOffset: number }[] {
  if (!file.endsWith('.astro')) return [{ code: text, lineOffset: 0 }];
  const out: { code: string; lineOffset: number }[] = [];
  const front = /^---\r?\n([\s\S]*?)\r?\n---/.exec(text);
  if (front) out.push({ code: front[1], lineOffset: 1 });
  for (const m of text.matchAll(/<script\b[^>]*>([\s\S]*?)<\/script>/g)) {
    out.push({ code: m[1], lineOffset: text.slice(0, m.index! + m[0].indexOf('>') + 1).split('\n').length - 1 });
  }
  return out;
}

/** Every static import, re-export and literal `import()` of one file. */
export function importsOf(root: string, file: string): ImportEdge[] {
  const rel = path.relative(root, file).split(path.sep).join('/');
  const text = fs.readFileSync(file, 'utf8');
  const edges: ImportEdge[] = [];
  for (const { code, lineOffset } of scriptsOf(file, text)) {
    const kind = file.endsWith('.tsx') ? ts.ScriptKind.TSX : file.endsWith('.mjs') || file.endsWith('.js') ? ts.ScriptKind.JS : ts.ScriptKind.TS;
    const source = ts.createSourceFile(rel, code, ts.ScriptTarget.Latest, true, kind);
    const add = (node: ts.Node, spec: string, names: string[], typeOnly: boolean) => {
      const target = spec.startsWith('.') ? path.posix.normalize(path.posix.join(path.posix.dirname(rel), spec)).replace(/\.(ts|tsx|mjs|js|astro)$/, '') : null;
      const line = source.getLineAndCharacterOfPosition(node.getStart(source)).line + 1 + lineOffset;
      edges.push({ file: rel, line, specifier: spec, target, names, typeOnly });
    };
    const visit = (node: ts.Node) => {
      if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
        const clause = node.importClause;
        const names: string[] = [];
        let typeOnly = clause?.isTypeOnly ?? false;
        if (clause && !clause.isTypeOnly) {
          if (clause.name) names.push('default');
          const b = clause.namedBindings;
          if (b && ts.isNamespaceImport(b)) names.push('*');
          if (b && ts.isNamedImports(b)) for (const e of b.elements) if (!e.isTypeOnly) names.push((e.propertyName ?? e.name).text);
          // `import { type A, type B } from …` loads nothing either.
          typeOnly = names.length === 0 && (b !== undefined || clause.name !== undefined);
        }
        add(node, node.moduleSpecifier.text, names, typeOnly);
      } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
        const names: string[] = [];
        if (!node.isTypeOnly) {
          if (!node.exportClause) names.push('*');
          else if (ts.isNamedExports(node.exportClause)) for (const e of node.exportClause.elements) if (!e.isTypeOnly) names.push((e.propertyName ?? e.name).text);
          else names.push('*');
        }
        add(node, node.moduleSpecifier.text, names, node.isTypeOnly || names.length === 0);
      } else if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword && node.arguments.length > 0 && ts.isStringLiteralLike(node.arguments[0])) {
        add(node, node.arguments[0].text, ['*'], false);
      } else if (ts.isImportTypeNode(node) && ts.isLiteralTypeNode(node.argument) && ts.isStringLiteral(node.argument.literal)) {
        add(node, node.argument.literal.text, [], true);
      }
      ts.forEachChild(node, visit);
    };
    visit(source);
  }
  return edges;
}

function sourceFiles(dir: string): string[] {
  if (!fs.existsSync(dir)) return [];
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...sourceFiles(p));
    else if (/\.(ts|tsx|mjs|astro)$/.test(entry.name) && !entry.name.endsWith('.d.ts')) out.push(p);
  }
  return out;
}

/** The rule an import breaks, or null. */
export function ruleBroken(edge: ImportEdge): string | null {
  const { file, target, specifier } = edge;
  if (under(file, CORE)) {
    const bare = specifier.replace(/^node:/, '').split('/')[0];
    if (specifier.startsWith('node:') || NODE_BUILTINS.has(bare)) return 'lib/analysis, lib/formats and lib/statistics are pure: no node:* modules';
    if (specifier.startsWith('astro:')) return 'lib/analysis, lib/formats and lib/statistics are pure: no astro:* modules';
    if (target !== null && !under(target, CORE)) return 'lib/analysis, lib/formats and lib/statistics import only each other and packages';
    return null;
  }
  for (const [from, forbidden, why] of FORBIDDEN) {
    if (file.startsWith(from) && under(target, forbidden)) return why;
  }
  if (file.startsWith('src/components/') && target !== null && under(target, ['src/lib/analysis/']) && !edge.typeOnly) {
    const helper = SCREEN_ANALYSIS_HELPERS.find((h) => h.module === target);
    if (helper && edge.names.length > 0 && edge.names.every((n) => helper.names.includes(n))) return null;
    return `screens do not import lib/analysis (only the helpers in SCREEN_ANALYSIS_HELPERS${helper ? `: ${helper.names.join(', ')}` : ''}); imported ${edge.names.join(', ') || 'for side effects'}`;
  }
  return null;
}

/** Every import under `<root>/src` and `<root>/workers` that breaks a rule and is not on a temporary list. */
export function importViolations(
  root: string,
  pending: readonly { file: string; module: string }[] = [...PENDING_SCREEN_IMPORTS, ...PENDING_OTHER_IMPORTS],
): Violation[] {
  const out: Violation[] = [];
  for (const file of [...sourceFiles(path.join(root, 'src')), ...sourceFiles(path.join(root, 'workers'))]) {
    for (const edge of importsOf(root, file)) {
      const rule = ruleBroken(edge);
      if (rule === null) continue;
      if (pending.some((p) => p.file === edge.file && p.module === edge.target)) continue;
      out.push({ file: edge.file, line: edge.line, specifier: edge.specifier, rule });
    }
  }
  return out;
}

/** One line per violation: `file:line imports 'specifier': rule`. */
export const describeViolation = (v: Violation) => `${v.file}:${v.line} imports '${v.specifier}': ${v.rule}`;
