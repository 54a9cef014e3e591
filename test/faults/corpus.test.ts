import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'yaml';
import { runCli } from '../fixtures/cli.ts';

/**
 * The plain cases of the fault corpus (no special preparation) replayed in
 * process: each bad input gives its exit code and its located message. The
 * rest (devices, pipes, full and read-only disks, kills, resumes, memory and
 * time limits) are replayed as real processes by `npm run faults`, which CI runs.
 */
interface FaultCase { id: string; about?: string; files?: Record<string, string>; setup?: string; args: string[]; exit: number; stderr?: string; stdout?: string; stderrMax?: number }
const corpus = parse(readFileSync(join(__dirname, '..', 'fixtures', 'faults', 'corpus.yaml'), 'utf8'), { maxAliasCount: -1 }) as { cases: FaultCase[] };
const work = mkdtempSync(join(tmpdir(), 'placode-corpus-'));
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('the fault corpus (test/fixtures/faults/corpus.yaml), plain cases', () => {
  const plain = corpus.cases.filter((c) => !c.setup);
  it('holds plain cases to replay', () => expect(plain.length).toBeGreaterThan(40));
  for (const c of plain) {
    it(`${c.id}${c.about ? `: ${c.about}` : ''}`, async () => {
      const dir = join(work, c.id);
      mkdirSync(dir, { recursive: true });
      for (const [name, text] of Object.entries(c.files ?? {})) writeFileSync(join(dir, name), text);
      const home = process.cwd();
      process.chdir(dir);
      try {
        const r = await runCli(...c.args);
        expect(r.code, r.err).toBe(c.exit);
        if (c.stderr) expect(r.err).toMatch(new RegExp(c.stderr));
        if (c.stdout) expect(r.out).toMatch(new RegExp(c.stdout));
        if (c.stderrMax !== undefined) expect(r.err.length).toBeLessThanOrEqual(c.stderrMax);
        expect(r.err).not.toMatch(/\n\s+at .+[(:]\d+/); // no stack trace
      } finally {
        process.chdir(home);
      }
    });
  }
});
