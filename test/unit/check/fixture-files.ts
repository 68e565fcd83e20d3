// Where the source fixtures are, shared by the recall test and the incremental-checker test.
import * as fs from 'node:fs';
import * as path from 'node:path';

export const FIXTURES_ROOT = path.resolve(__dirname, '..', '..', 'fixtures');

/** Source fixtures on disk, relative to FIXTURES_ROOT (everything except the manifest and the editor helper's workspace). */
export function fixtureFiles(): string[] {
  const out: string[] = [];
  const walk = (d: string): void => {
    for (const n of fs.readdirSync(d).sort()) {
      const p = path.join(d, n);
      if (fs.statSync(p).isDirectory()) { if (n !== 'workspace') walk(p); }
      else if (n !== 'expected.json') out.push(path.relative(FIXTURES_ROOT, p).split(path.sep).join('/'));
    }
  };
  walk(FIXTURES_ROOT);
  return out;
}

/** A fixture's text followed by `edits` successive edits of it (`edit` draws from the caller's seeded stream). */
export function editSeries(file: string, edits: number, edit: (text: string) => string): string[] {
  const out = [fs.readFileSync(path.join(FIXTURES_ROOT, file), 'utf8')];
  for (let k = 0; k < edits; k++) out.push(edit(out[out.length - 1]!));
  return out;
}
