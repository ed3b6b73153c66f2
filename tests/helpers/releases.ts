/**
 * Build small releases for tests from a compact text form:
 *   "C1 disorder: Heart attack* | Myocardial infarction"   (* marks the preferred term)
 *   "C2 disorder (inactive): Old thing*"
 * One line per concept. Hierarchies: "C1 < P1, P2".
 */
import { loadHierarchy, loadHistory, loadRelease } from '../../src/load/index.js';
import type { DiffInputs } from '../../src/pipeline.js';
import { tempDir, tsv, writeFile } from './files.js';

export function releaseTsv(spec: string): string {
  const rows: string[][] = [['concept_id', 'term', 'term_type', 'status', 'category']];
  for (const raw of spec.trim().split('\n')) {
    const line = raw.trim();
    if (!line) continue;
    const m = /^(\S+)\s+([^:(]*?)\s*(\((inactive)\))?:\s*(.*)$/.exec(line);
    if (!m) throw new Error(`bad spec line: ${line}`);
    const [, id, category, , inactive, terms] = m;
    for (const t of terms.split('|')) {
      const term = t.trim();
      const preferred = term.endsWith('*');
      rows.push([id, preferred ? term.slice(0, -1) : term, preferred ? 'preferred' : 'synonym', inactive ? 'inactive' : 'active', category.trim()]);
    }
  }
  return tsv(rows);
}

export function hierarchyTsv(spec: string): string {
  const rows: string[][] = [['concept_id', 'parent_id']];
  for (const raw of spec.trim().split('\n')) {
    const [child, parents] = raw.split('<').map((s) => s.trim());
    for (const p of parents.split(',')) rows.push([child, p.trim()]);
  }
  return tsv(rows);
}

export interface PairSpec {
  old: string;
  new: string;
  oldHierarchy?: string;
  newHierarchy?: string;
  /** "A > B replaced_by" lines */
  history?: string;
}

export async function loadPair(spec: PairSpec): Promise<DiffInputs> {
  const dir = tempDir();
  const inputs: DiffInputs = {
    old: await loadRelease(writeFile(dir, 'old.tsv', releaseTsv(spec.old))),
    new: await loadRelease(writeFile(dir, 'new.tsv', releaseTsv(spec.new))),
  };
  if (spec.oldHierarchy) inputs.oldHierarchy = await loadHierarchy(writeFile(dir, 'oh.tsv', hierarchyTsv(spec.oldHierarchy)));
  if (spec.newHierarchy) inputs.newHierarchy = await loadHierarchy(writeFile(dir, 'nh.tsv', hierarchyTsv(spec.newHierarchy)));
  if (spec.history) {
    const rows = [['old_id', 'new_id', 'relation']];
    for (const l of spec.history.trim().split('\n')) {
      const m = /^(\S+)\s*>\s*(\S+)\s*(\S*)$/.exec(l.trim());
      if (!m) throw new Error(`bad history line: ${l}`);
      rows.push([m[1], m[2], m[3] || 'replaced_by']);
    }
    inputs.history = await loadHistory(writeFile(dir, 'history.tsv', tsv(rows)));
  }
  return inputs;
}
