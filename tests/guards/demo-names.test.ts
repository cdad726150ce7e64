/**
 * Guard: names retired from the demo scenario and the test fixtures must not come back.
 *
 * They were retired because they sat too close to real organisations, clinics or device brands
 * (a hospital one letter away from a real one, brand-like model words) or to a well-known
 * retailer's name ("Home depot" as a label). The demo is a scenario of our own: invented
 * organisations, letter-digit model designations, `.example` e-mail domains. This test reads
 * every file git tracks (text only) and fails with the file and line of any retired name.
 */
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const root = path.resolve(__dirname, '../..');

/** Retired names, matched case-sensitively as written (plus their lower-case slugs). */
const retired: { pattern: RegExp; use: string }[] = [
  { pattern: /Harbourview|harbourview/, use: 'Velmora Health / velmora.example' },
  { pattern: /Rheinau|rheinau/, use: 'Klinikum Orlenbach / orlenbach.example' },
  { pattern: /Kestrel|kestrel/, use: 'Quorvel Surgical / quorvel.example' },
  {
    pattern: /\bMeridian\b|'meridian'|organisations\.meridian/,
    use: 'an invented lender name in fixtures (Dralvik Medical Loans)',
  },
  {
    pattern: /Northgate|northgate/,
    use: 'an invented hospital name in fixtures (Zelvara Hospitals)',
  },
  {
    pattern: /Pathfinder|FlexView|ClearPath|IrriFlow|Aurora 4K|Lumen TFL|Lumen laser/,
    use: 'a letter-digit designation (Quorvel R2, U75, C11, T60, V4, P1)',
  },
  {
    pattern:
      /Vantage ureteroscope|Atlas robotic|Slimline ureteroscope|Vista imaging|Beacon imaging/,
    use: 'a letter-digit designation in fixtures',
  },
  {
    pattern: /\b(KPR2|KFV75|KCP11|KTFL60|KA4K|KPIS)-\d/,
    use: 'the Quorvel serial prefixes (QR2, QU75, QC11, QT60, QV4, QP1, QR2S)',
  },
  { pattern: /\b[Hh]ome depot\b/, use: '"base depot"' },
  {
    pattern: /\bShips by\b/,
    use: '"Ship by" (one wording for the milestone on screens and in e-mails)',
  },
];

/** Binary files and the lock file (package names only) are not read. */
const skipped = [/\.(png|jpe?g|gif|ico|pdf|woff2?|ttf|otf)$/i, /(^|\/)package-lock\.json$/];

function trackedFiles(): string[] {
  const out = execFileSync(
    'git',
    ['ls-files', '-z', '--cached', '--others', '--exclude-standard'],
    {
      cwd: root,
      encoding: 'utf8',
      maxBuffer: 64 * 1024 * 1024,
    },
  );
  return out.split('\0').filter((f) => f && !skipped.some((re) => re.test(f)));
}

describe('retired demo names', () => {
  const self = path.relative(root, __filename).split(path.sep).join('/');
  const files = trackedFiles().filter((f) => f !== self);

  it('reads the repository (sanity: the demo data and the README are among the files)', () => {
    expect(files).toEqual(expect.arrayContaining(['README.md', 'server/src/demo/demo-data.ts']));
  });

  it('finds none of the retired names in any tracked text file', () => {
    const hits: string[] = [];
    for (const file of files) {
      const full = path.join(root, file);
      if (!fs.existsSync(full)) continue; // deleted in the working tree
      const text = fs.readFileSync(full, 'utf8');
      if (text.includes('\0')) continue;
      text.split('\n').forEach((line, i) => {
        for (const { pattern, use } of retired) {
          const m = pattern.exec(line);
          if (m) hits.push(`${file}:${i + 1}: "${m[0]}" (use ${use})`);
        }
      });
    }
    expect(hits).toEqual([]);
  });

  it('would catch a retired name (the matcher is not vacuous)', () => {
    const sample = 'buyer@harbour' + 'view.example ships from its Home ' + 'depot';
    const found = retired.filter(({ pattern }) => pattern.test(sample)).map((r) => r.use);
    expect(found).toHaveLength(2);
  });
});
