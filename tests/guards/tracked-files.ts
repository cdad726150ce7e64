import { execFileSync } from 'node:child_process';
import path from 'node:path';

/** The repository's root folder. */
export const repoRoot = path.resolve(__dirname, '../..');

/** Files git tracks, and untracked ones it does not ignore, relative to the repository root. */
export function trackedFiles(): string[] {
  const out = execFileSync(
    'git',
    ['ls-files', '-z', '--cached', '--others', '--exclude-standard'],
    {
      cwd: repoRoot,
      encoding: 'utf8',
      maxBuffer: 64 * 1024 * 1024,
    },
  );
  return out.split('\0').filter(Boolean);
}
