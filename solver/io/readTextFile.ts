import { readFileSync } from 'node:fs';
import { UsageError } from '../UsageError.ts';
import { fileErrorWords, regularFileSize } from './fileAccess.ts';
import { TEXT_FILE_MAX_BYTES } from '../defaults.ts';

/**
 * A text file's contents (a scenario, a sweep): a regular file of at most
 * TEXT_FILE_MAX_BYTES, checked before it is read; a missing file, a directory,
 * a device or pipe, or a file too large is a usage error that says what was
 * expected (`what`).
 */
export function readTextFile(file: string, what: string): string {
  regularFileSize(file, what, TEXT_FILE_MAX_BYTES, (m) => new UsageError(m));
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    throw new UsageError(`${file}: ${fileErrorWords(e)}`);
  }
}
