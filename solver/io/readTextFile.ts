import { readFileSync } from 'node:fs';
import { UsageError } from '../UsageError.ts';

/** A text file's contents; a missing file or a directory is a usage error that says what was expected (`what`). */
export function readTextFile(file: string, what: string): string {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`${file}: ${code === 'ENOENT' ? `no such ${what}` : code === 'EISDIR' ? `is a directory, not a ${what}` : (e as Error).message}`);
  }
}
