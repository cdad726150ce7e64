/**
 * Guard: a comment that cites a file must cite one that is in the repository.
 *
 * Comments used to point at design notes kept outside the repository, so a reader could not
 * follow them. The notes now live under `docs/` (`docs/design/product.md`,
 * `docs/design/architecture.md`, `docs/references.md`); this test reads the comments of every
 * tracked source file and fails with the file, line and citation of any that names a missing
 * Markdown file, or a missing path under one of the repository's top-level folders.
 */
import fs from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { repoRoot as root, trackedFiles } from './tracked-files';

/** Source files whose comments are read. */
const scriptFile = /\.(c|m)?(t|j)sx?$/;
const styleFile = /\.(s?css)$/;
const markupFile = /\.html$/;

/**
 * Files of packages other engineers are changing at the same time, which still cite the old
 * outside notes; they move to `docs/references.md` when that work merges. Each entry must still
 * hold such a citation (the third test), so the list can only shrink.
 */
const pendingElsewhere: readonly string[] = [];

function sourceFiles(): string[] {
  return trackedFiles()
    .filter((f) => [scriptFile, styleFile, markupFile].some((re) => re.test(f)))
    .filter((f) => fs.existsSync(path.join(root, f)));
}

/** One comment: its text and the 1-based line it starts on. */
interface Comment {
  readonly line: number;
  readonly text: string;
}

function lineOf(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

/**
 * Comments of a script, from TypeScript's parser: the leading and trailing comment ranges of
 * every node and token, so strings, template literals and regular expressions are never read as
 * comments (a bare scanner loses its way after a template substitution).
 */
function scriptComments(text: string, file: string): Comment[] {
  const kind = /\.(c|m)?jsx?$/.test(file) ? ts.ScriptKind.JSX : ts.ScriptKind.TSX;
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, kind);
  const seen = new Map<number, Comment>();
  const collect = (ranges: readonly ts.CommentRange[] | undefined) => {
    for (const r of ranges ?? []) {
      if (!seen.has(r.pos)) {
        seen.set(r.pos, { line: lineOf(text, r.pos), text: text.slice(r.pos, r.end) });
      }
    }
  };
  const visit = (node: ts.Node) => {
    collect(ts.getLeadingCommentRanges(text, node.pos));
    collect(ts.getTrailingCommentRanges(text, node.end));
    for (const child of node.getChildren(source)) visit(child);
  };
  visit(source);
  return [...seen.values()].sort((a, b) => a.line - b.line);
}

function patternComments(text: string, pattern: RegExp): Comment[] {
  return [...text.matchAll(pattern)].map((m) => ({ line: lineOf(text, m.index), text: m[0] }));
}

/** The comments of one file, by its kind. */
export function commentsOf(file: string, text: string): Comment[] {
  if (scriptFile.test(file)) return scriptComments(text, file);
  if (styleFile.test(file)) return patternComments(text, /\/\*[\s\S]*?\*\/|\/\/[^\n]*/g);
  return patternComments(text, /<!--[\s\S]*?-->/g);
}

const topFolders = ['apps', 'docs', 'infra', 'packages', 'server', 'tests'];
const citation = new RegExp(
  [
    // A Markdown file, bare or with a path.
    String.raw`(?:[\w.-]+\/)*[\w-]+(?:\.[\w-]+)*\.md\b`,
    // A path from the repository root with a file extension.
    String.raw`\b(?:${topFolders.join('|')})\/(?:[\w.-]+\/)*[\w-]+(?:\.[\w-]+)+`,
  ].join('|'),
  'g',
);

/** The files a comment cites (web addresses left out). */
export function citationsIn(comment: string): string[] {
  const withoutUrls = comment.replace(/\b[a-z]+:\/\/\S+/gi, ' ');
  return [...withoutUrls.matchAll(citation)].map((m) => m[0]);
}

/**
 * Whether a cited file exists: from the repository root, or beside the citing file.
 */
export function citedFileExists(cited: string, fromFile: string): boolean {
  // Build output (e.g. server/dist/main.js) is made by the build, not kept in git.
  if (/(^|\/)dist\//.test(cited)) return true;
  const candidates = [path.join(root, cited), path.join(root, path.dirname(fromFile), cited)];
  return candidates.some((c) => fs.existsSync(c));
}

function missingCitations(file: string): string[] {
  const text = fs.readFileSync(path.join(root, file), 'utf8');
  if (text.includes('\0')) return [];
  const missing: string[] = [];
  for (const comment of commentsOf(file, text)) {
    for (const cited of citationsIn(comment.text)) {
      if (!citedFileExists(cited, file)) missing.push(`${file}:${comment.line}: ${cited}`);
    }
  }
  return missing;
}

describe('files cited in comments', () => {
  const files = sourceFiles();

  it('reads the repository (sanity: server, client and package sources are among the files)', () => {
    expect(files).toEqual(
      expect.arrayContaining([
        'server/src/app.ts',
        'apps/web/src/app/app.routes.ts',
        'packages/scheduling/src/footprint.ts',
      ]),
    );
  });

  it('are all in the repository', () => {
    const missing = files.filter((f) => !pendingElsewhere.includes(f)).flatMap(missingCitations);
    expect(missing).toEqual([]);
  });

  it('lists as pending only files that still cite a missing file', () => {
    const settled = pendingElsewhere.filter(
      (f) => !fs.existsSync(path.join(root, f)) || missingCitations(f).length === 0,
    );
    expect(settled).toEqual([]);
  });

  it('would catch a missing file and let a present one, a web address and code through', () => {
    const sample = [
      '// See reference-values.md and docs/references.md, "Money and payments".',
      '/* README.md; https://example.org/notes.md; server/src/not-there.ts */',
      "const text = 'ghost.md in a string is not a comment';",
    ].join('\n');
    const cited = commentsOf('sample.ts', sample).flatMap((c) => citationsIn(c.text));
    expect(cited).toEqual([
      'reference-values.md',
      'docs/references.md',
      'README.md',
      'server/src/not-there.ts',
    ]);
    expect(cited.filter((c) => !citedFileExists(c, 'tests/guards/sample.ts'))).toEqual([
      'reference-values.md',
      'server/src/not-there.ts',
    ]);
    expect(commentsOf('page.html', '<p>x.md</p><!-- see docs/missing.md -->')).toEqual([
      { line: 1, text: '<!-- see docs/missing.md -->' },
    ]);
  });
});
