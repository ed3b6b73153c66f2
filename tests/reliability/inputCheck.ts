/**
 * The invariants every input must keep, whatever its bytes (used by the fuzz test and by the
 * regression files it left behind):
 *  - a loader either returns or throws a TermdriftError (a stable code, a location); nothing else;
 *  - the accounting is exact: read = used + rejected, one rejected diagnostic per rejected row,
 *    every diagnostic on a line that exists;
 *  - no line is lost: in a file without a double quote (so no record spans lines), every
 *    physical line is the header, a metadata line, a blank line or one record;
 *  - for releases, the byte reader (readTsvBytes) and the string path (readTable) give the same
 *    values, diagnostics and errors, also with blocks so small that lines and UTF-8 sequences are
 *    cut across them.
 */
import { expect } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { TermdriftError } from '../../src/errors.js';
import { loadHierarchy, loadHistory, loadMappings, loadRelease, type Loaded, type Release, type TableKind } from '../../src/load/index.js';

export type Outcome = { error: { code: string; location: unknown } } | { loaded: Loaded };

async function attempt(load: () => Promise<Loaded>): Promise<Outcome> {
  try {
    return { loaded: await load() };
  } catch (err) {
    // Anything but a TermdriftError is a crash (exit 70 at the CLI).
    if (!(err instanceof TermdriftError)) throw err;
    return { error: { code: err.code, location: err.location } };
  }
}

export function loaderFor(kind: TableKind, path: string, options: Record<string, unknown> = {}): () => Promise<Loaded> {
  switch (kind) {
    case 'release':
      return () => loadRelease(path, options);
    case 'mapping':
      return () => loadMappings(path);
    case 'hierarchy':
      return () => loadHierarchy(path);
    case 'history':
      return () => loadHistory(path);
  }
}

/** Physical lines as the readers count them: text between `\n`, the last one without one. */
function physicalLines(bytes: Buffer): number {
  let n = 0;
  for (const b of bytes) if (b === 10) n++;
  return bytes.length > 0 && bytes[bytes.length - 1] !== 10 ? n + 1 : n;
}

function releaseContents(r: Release) {
  return {
    accounting: r.accounting,
    diagnostics: r.diagnostics,
    conceptIds: r.conceptIds,
    termText: r.termText,
    termId: r.termId,
    termConcept: Array.from(r.termConcept),
    termType: Array.from(r.termType),
    termLine: Array.from(r.termLine),
    conceptStatus: Array.from(r.conceptStatus),
    conceptCategory: Array.from(r.conceptCategory),
  };
}

const view = (o: Outcome) => ('error' in o ? o.error : releaseContents(o.loaded as Release));

/** Check one input; `name` sets the extension (and so the delimiter). Returns the outcome. */
export async function checkInput(dir: string, name: string, kind: TableKind, bytes: Buffer): Promise<Outcome> {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  const outcome = await attempt(loaderFor(kind, path));
  if ('error' in outcome) {
    expect((outcome.error.location as { file?: string }).file).toBe(path);
  } else {
    const { accounting: a, diagnostics } = outcome.loaded;
    expect(a.read).toBe(a.used + a.rejected);
    expect(diagnostics.filter((d) => d.rejected)).toHaveLength(a.rejected);
    expect(new Set(diagnostics.filter((d) => d.rejected).map((d) => d.line)).size).toBe(a.rejected);
    // Lines are counted in the text: a .gz file is decompressed first (a loaded one decompresses).
    const text = name.endsWith('.gz') ? gunzipSync(bytes) : bytes;
    const lines = physicalLines(text);
    for (const d of diagnostics) {
      expect(d.line).toBeGreaterThanOrEqual(1);
      expect(d.line).toBeLessThanOrEqual(lines);
      expect(d.column).toBeGreaterThanOrEqual(1);
    }
    if (!text.includes(0x22)) {
      // No quote, so one record per line: header + metadata + blank lines + rows = lines.
      // Metadata lines: the `#` lines before the header (only mapping sets have them).
      let metadata = 0;
      if (kind === 'mapping') {
        for (const l of text.toString('utf8').replace(/^\uFEFF/, '').split('\n')) {
          if (l.startsWith('#')) metadata++;
          else if (l.trim() !== '') break;
        }
      }
      expect(1 + metadata + a.blankLines + a.read).toBe(lines);
    }
  }
  if (kind === 'release' && !name.endsWith('.csv')) {
    const strings = view(await attempt(loaderFor('release', path, { reader: 'strings' })));
    expect(view(outcome)).toEqual(strings);
    // Tiny blocks cut lines and characters across block ends; a big input gets bigger ones.
    let textLength = bytes.length;
    try {
      if (name.endsWith('.gz')) textLength = gunzipSync(bytes).length;
    } catch {
      // damaged gzip: the loaders stop early
    }
    const sizes = textLength < 1 << 16 ? [[5, 3], [64, 7]] : [[1 << 16, 4099]];
    for (const [blockSize, readSize] of sizes) {
      expect(view(await attempt(loaderFor('release', path, { reader: 'bytes', blockSize, readSize }))), `block ${blockSize} read ${readSize}`).toEqual(strings);
    }
  }
  return outcome;
}
