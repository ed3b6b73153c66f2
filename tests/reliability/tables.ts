/**
 * Rewrites of TSV tables that must not change what termdrift finds: shuffling the data rows,
 * permuting the columns, renaming identifiers through a one-to-one map. They work on the text
 * of the plain tables the generator and the demo use (one header row, no quoting; a `#`
 * metadata block is kept in front), and a seeded Fisher–Yates shuffle makes every run
 * reproducible from its seed.
 */

/** mulberry32: a small seeded generator (public domain, common practice for test shuffles). */
export function seeded(seed: number): () => number {
  let s = seed | 0;
  return () => {
    s = (s + 0x6d2b79f5) | 0;
    let t = Math.imul(s ^ (s >>> 15), 1 | s);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function shuffle<T>(items: readonly T[], rnd: () => number): T[] {
  const a = [...items];
  for (let i = a.length - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    [a[i], a[j]] = [a[j], a[i]];
  }
  return a;
}

interface Table {
  metadata: string[];
  header: string[];
  rows: string[][];
}

export function parseTable(text: string): Table {
  const lines = text.split('\n');
  if (lines[lines.length - 1] === '') lines.pop();
  const metadata: string[] = [];
  while (lines.length && lines[0].startsWith('#')) metadata.push(lines.shift()!);
  const header = lines.shift()!.split('\t');
  return { metadata, header, rows: lines.map((l) => l.split('\t')) };
}

export function formatTable(t: Table): string {
  return [...t.metadata, t.header.join('\t'), ...t.rows.map((r) => r.join('\t'))].join('\n') + '\n';
}

/** The same table with its data rows in a random order. */
export function shuffleRows(text: string, rnd: () => number): string {
  const t = parseTable(text);
  return formatTable({ ...t, rows: shuffle(t.rows, rnd) });
}

/** The same table with its columns in a random order (the header moves with them). */
export function shuffleColumns(text: string, rnd: () => number): string {
  const t = parseTable(text);
  const order = shuffle(t.header.map((_, i) => i), rnd);
  return formatTable({ metadata: t.metadata, header: order.map((i) => t.header[i]), rows: t.rows.map((r) => order.map((i) => r[i])) });
}

/** Replace every value of the named columns by `rename(value)` (empty values stay empty). */
export function renameColumns(text: string, columns: readonly string[], rename: (id: string) => string): string {
  const t = parseTable(text);
  const at = columns.map((c) => t.header.indexOf(c)).filter((i) => i >= 0);
  return formatTable({ ...t, rows: t.rows.map((r) => r.map((v, i) => (at.includes(i) && v !== '' ? rename(v) : v))) });
}
