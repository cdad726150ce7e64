/**
 * Guard: names retired from the demo scenario and the test fixtures must not come back.
 *
 * Why they were retired is written beside the list (retired-names.cjs). The demo is a scenario
 * of our own: invented
 * organisations, letter-digit model designations, `.example` e-mail domains. This test reads
 * every file git tracks (text only) and fails with the file and line of any retired name; the
 * list lives in retired-names.cjs, which the screenshot script uses too.
 */
import fs from 'node:fs';
import path from 'node:path';
import { findRetiredName, retiredNames } from './retired-names.cjs';
import { repoRoot as root, trackedFiles as allTrackedFiles } from './tracked-files';

/** Binary files and the lock file (package names only) are not read. */
const skipped = [/\.(png|jpe?g|gif|ico|pdf|woff2?|ttf|otf)$/i, /(^|\/)package-lock\.json$/];

function trackedFiles(): string[] {
  return allTrackedFiles().filter((f) => !skipped.some((re) => re.test(f)));
}

describe('retired demo names', () => {
  // The list itself is the one file allowed to spell the retired names.
  const list = 'tests/guards/retired-names.cjs';
  const files = trackedFiles().filter((f) => f !== list);

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
        const hit = findRetiredName(line);
        if (hit) hits.push(`${file}:${i + 1}: "${hit.name}" (use ${hit.use})`);
      });
    }
    expect(hits).toEqual([]);
  });

  it('would catch a retired name (the matcher is not vacuous)', () => {
    const sample = 'buyer@harbour' + 'view.example ships from its Home ' + 'depot';
    const found = retiredNames.filter(({ pattern }) => pattern.test(sample)).map((r) => r.use);
    expect(found).toHaveLength(2);
  });
});
