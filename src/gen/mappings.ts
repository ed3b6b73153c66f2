/**
 * generateMappings: an institution's mapping set over the old release, with the verdict a
 * correct re-scoring gives each mapping against the new release.
 *
 * Which concepts are mapped: every old concept an injected change touched (one mapping per
 * place its terms went for a split or reorganization, two for the source of a moved synonym:
 * one labelled from the moved synonym, one from another term), and a random sample of the
 * rest, about one mapping per `every` concepts in all. A few mappings (`unknownShare`) point to
 * an identifier that is in neither release (a mistyped code).
 *
 * Each local label is built from one term of the target (so the truth knows which term the
 * label names) and perturbed as local labels are: abbreviations from LOCAL_ABBREVIATIONS, word
 * order turned round, an extra local qualifier ("(adult)", "- ED"), one typing error (one edit
 * in a word of 5 letters or more), all upper case. Usage counts follow a Zipf-like law
 * (usage ∝ 1 / rank^1.1), so a few codes carry most of the records.
 *
 * Verdicts (rescore/types.ts VERDICTS) from what happened to the target:
 * - ok: unchanged, cosmetic edits, renamed (preferred_term_change), synonyms added or removed
 *   (labels are then built from a term that stays), the survivor of a merge, the receiving end
 *   of a moved synonym, or its source when the label was not built from the moved synonym;
 * - redirect: merged into or replaced by one concept (successor = that concept);
 * - ambiguous: split or reorganized (successor = the concept that received the label's term);
 * - broken: retired, no successor;
 * - drifted: identifier reused (successor = the concept carrying the old meaning, or ''), or
 *   the label was built from a synonym that moved (successor = the receiving concept);
 * - context_changed: category or parents changed while the terms held;
 * - unknown_target: the target is not in the old release.
 */
import type { Verdict } from '../rescore/types.js';
import type { InjectResult } from './inject.js';
import { Rng } from './random.js';
import type { BaseConcept, BaseRelease, ConceptOutcome, GenMapping, MappingTruth } from './types.js';

export interface MappingOptions {
  seed: number | string;
  /** About one mapping per this many active old concepts (default 10). */
  every?: number;
  /** Share of mappings whose target is in neither release (default 0.01). */
  unknownShare?: number;
}

/** Local abbreviations of the vocabulary's words (whole words or phrases, lower case). */
export const LOCAL_ABBREVIATIONS: Readonly<Record<string, string>> = {
  left: 'lt', right: 'rt', bilateral: 'bilat', fracture: 'fx', haemorrhage: 'haem', haemoglobin: 'Hb',
  measurement: 'meas', laparoscopic: 'lap', percutaneous: 'perc', endoscopic: 'endo', excision: 'exc',
  biopsy: 'bx', chronic: 'chr', acute: 'ac', severe: 'sev', moderate: 'mod', posterior: 'post',
  anterior: 'ant', proximal: 'prox', distal: 'dist', lateral: 'lat', medial: 'med', superior: 'sup',
  inferior: 'inf', glucose: 'gluc', potassium: 'K', sodium: 'Na', creatinine: 'creat', cholesterol: 'chol',
  infection: 'infxn', inflammation: 'inflam', obstruction: 'obstr', reconstruction: 'recon', injection: 'inj',
  concentration: 'conc', intermittent: 'intermit', persistent: 'persist', radiography: 'XR', segment: 'seg',
  serotype: 'sero', hydrochloride: 'HCl', following: 'post', recurrent: 'recur', calcium: 'Ca',
  'cerebrospinal fluid': 'CSF', 'whole blood': 'WB', 'ultrasound scan': 'USS', 'magnetic resonance imaging': 'MRI',
  'computed tomography': 'CT', 'malignant neoplasm': 'ca', 'benign neoplasm': 'BN', 'due to': 'd/t',
};

const PHRASES = Object.keys(LOCAL_ABBREVIATIONS).filter((k) => k.includes(' '));

/** Local qualifiers a department adds to a label. */
const QUALIFIERS = ['(adult)', '- ED', '[OP]', '- ward', 'routine', '(local)'];
const LAB_QUALIFIERS = ['- main lab', '(send away)', 'level'];

const OWNERS: Readonly<Record<string, string>> = {
  disorder: 'clinic', finding: 'emergency', procedure: 'theatres', 'lab test': 'laboratory',
  substance: 'pharmacy', organism: 'microbiology', 'body structure': 'radiology',
};

/** Apply local abbreviations to some of the words and phrases of a label. */
export function abbreviate(label: string, rng: Rng, p = 0.7): string {
  let out = label;
  for (const phrase of PHRASES) {
    const at = out.toLowerCase().indexOf(phrase);
    if (at >= 0 && rng.chance(p)) out = out.slice(0, at) + LOCAL_ABBREVIATIONS[phrase] + out.slice(at + phrase.length);
  }
  return out
    .split(' ')
    .map((w) => {
      const bare = w.replace(/[,.]$/, '');
      const abbr = LOCAL_ABBREVIATIONS[bare.toLowerCase()];
      return abbr !== undefined && rng.chance(p) ? abbr + w.slice(bare.length) : w;
    })
    .join(' ');
}

/** Turn the word order round: "A of B" (also in, from) → "B A"; "A, B" → "B A"; else the first word goes last. */
export function reorder(label: string): string {
  const m = / (of|in|from) /.exec(label);
  const swap = (head: string, tail: string) => `${tail.charAt(0).toUpperCase()}${tail.slice(1)} ${head.charAt(0).toLowerCase()}${head.slice(1)}`;
  if (m && m.index > 0) return swap(label.slice(0, m.index), label.slice(m.index + m[0].length));
  const comma = label.indexOf(', ');
  if (comma > 0) return swap(label.slice(0, comma), label.slice(comma + 2));
  const ws = label.split(' ');
  return ws.length > 1 ? swap(ws[0], ws.slice(1).join(' ')) : label;
}

const LETTERS = 'abcdefghijklmnopqrstuvwxyz';

/** One edit (substitution, deletion, insertion or transposition) in a word of at least 5 letters. */
export function typo(label: string, rng: Rng): string {
  const ws = label.split(' ');
  const long = ws.map((w, i) => (/^[A-Za-z]{5,}$/.test(w) ? i : -1)).filter((i) => i >= 0);
  if (long.length === 0) return label;
  const wi = rng.pick(long);
  const w = ws[wi];
  const i = 1 + rng.int(w.length - 2);
  const letter = LETTERS.charAt(rng.int(26));
  switch (rng.int(4)) {
    case 0: {
      // Another letter than the one replaced.
      const cur = LETTERS.indexOf(w.charAt(i).toLowerCase());
      ws[wi] = w.slice(0, i) + LETTERS.charAt((cur + 1 + rng.int(25)) % 26) + w.slice(i + 1);
      break;
    }
    case 1:
      ws[wi] = w.slice(0, i) + w.slice(i + 1);
      break;
    case 2:
      ws[wi] = w.slice(0, i) + letter + w.slice(i);
      break;
    default:
      ws[wi] = w.charAt(i) === w.charAt(i + 1) ? w.slice(0, i) + w.slice(i + 1) : w.slice(0, i) + w.charAt(i + 1) + w.charAt(i) + w.slice(i + 2);
  }
  return ws.join(' ');
}

/** A local label built from a term, perturbed (see the file header). */
export function localLabel(term: string, category: string, rng: Rng): string {
  let label = term;
  if (rng.chance(0.4)) label = abbreviate(label, rng);
  if (category !== 'organism' && rng.chance(0.2)) label = reorder(label);
  if (rng.chance(0.3)) label = `${label} ${rng.pick(category === 'lab test' ? [...QUALIFIERS, ...LAB_QUALIFIERS] : QUALIFIERS)}`;
  if (rng.chance(0.25)) label = typo(label, rng);
  if (rng.chance(0.15)) label = label.toUpperCase();
  return label.trim() === '' ? term : label;
}

/** The verdict for a mapping to `target` whose label was built from `term`. */
export function verdictFor(target: string, outcome: ConceptOutcome | undefined, term: string): { verdict: Verdict; successor: string } {
  if (!outcome) return { verdict: 'ok', successor: '' };
  switch (outcome.kind) {
    case 'cosmetic':
    case 'preferred_term_change':
    case 'synonym_added':
    case 'synonym_removed':
    case 'addition':
      return { verdict: 'ok', successor: '' };
    case 'category_change':
    case 'hierarchy_change':
      return { verdict: 'context_changed', successor: '' };
    case 'retirement':
      return { verdict: 'broken', successor: '' };
    case 'replacement':
      return { verdict: 'redirect', successor: outcome.successor ?? '' };
    case 'merge':
      return outcome.role === 'survivor' ? { verdict: 'ok', successor: '' } : { verdict: 'redirect', successor: outcome.successor ?? '' };
    case 'split':
    case 'reorganization':
      return { verdict: 'ambiguous', successor: outcome.termTo.get(term) ?? '' };
    case 'moved_synonym': {
      const to = outcome.termTo.get(term);
      return outcome.role === 'source' && to && to !== target ? { verdict: 'drifted', successor: to } : { verdict: 'ok', successor: '' };
    }
    case 'id_reuse':
      return { verdict: 'drifted', successor: outcome.successor ?? '' };
  }
}

const isActive = (c: BaseConcept) => c.status === 'active' && c.terms.length > 0;

/** The terms to build labels from for a touched concept (one label per entry). */
function labelTerms(concept: BaseConcept, outcome: ConceptOutcome, rng: Rng): string[] {
  const texts = concept.terms.map((t) => t.text);
  switch (outcome.kind) {
    case 'split':
    case 'reorganization': {
      // One term per destination, so each part is someone's successor.
      const byDest = new Map<string, string[]>();
      for (const t of texts) {
        const d = outcome.termTo.get(t) ?? '';
        const list = byDest.get(d);
        if (list) list.push(t);
        else byDest.set(d, [t]);
      }
      return [...byDest.keys()].sort().map((d) => rng.pick(byDest.get(d)!));
    }
    case 'moved_synonym': {
      if (outcome.role !== 'source') return [rng.pick(texts)];
      const moved = texts.filter((t) => outcome.termTo.get(t) !== concept.id);
      const stayed = texts.filter((t) => outcome.termTo.get(t) === concept.id);
      return [rng.pick(moved), rng.pick(stayed)];
    }
    case 'synonym_removed':
      return [rng.pick(texts.filter((t) => outcome.termTo.get(t) === concept.id))];
    default:
      return [rng.chance(0.5) ? texts[0] : rng.pick(texts)];
  }
}

/** An identifier in neither release: a code of the old release with one digit changed. */
function unknownId(ids: readonly string[], taken: (id: string) => boolean, rng: Rng): string {
  for (let attempt = 0; attempt < 100; attempt++) {
    const id = rng.pick(ids);
    const digits = [...id].map((ch, i) => (ch >= '0' && ch <= '9' ? i : -1)).filter((i) => i >= 0);
    if (digits.length === 0) continue;
    const i = rng.pick(digits);
    const cand = id.slice(0, i) + String((Number(id.charAt(i)) + 1 + rng.int(9)) % 10) + id.slice(i + 1);
    if (!taken(cand)) return cand;
  }
  return `${rng.pick(ids)}-unknown`;
}

export function generateMappings(old: BaseRelease, injected: InjectResult, options: MappingOptions): { mappings: GenMapping[]; truth: MappingTruth[] } {
  const rng = new Rng(options.seed, 'mappings');
  const every = options.every ?? 10;
  if (!(every >= 1)) throw new RangeError(`generateMappings: every must be at least 1, got ${every}`);
  const unknownShare = options.unknownShare ?? 0.01;
  const active = old.concepts.filter(isActive);
  const drafts: { concept: BaseConcept | null; term: string; target: string; verdict: Verdict; successor: string }[] = [];

  const touched: BaseConcept[] = [];
  for (const id of injected.outcomes.keys()) {
    const i = injected.oldIndexOf(id);
    if (i >= 0 && isActive(old.concepts[i])) touched.push(old.concepts[i]);
  }
  touched.sort((a, b) => injected.oldIndexOf(a.id) - injected.oldIndexOf(b.id));
  for (const c of touched) {
    const outcome = injected.outcomes.get(c.id)!;
    for (const term of labelTerms(c, outcome, rng)) drafts.push({ concept: c, term, target: c.id, ...verdictFor(c.id, outcome, term) });
  }
  const wanted = Math.round(active.length / every);
  const sampleP = Math.max(0, wanted - drafts.length) / Math.max(1, active.length - touched.length);
  for (const c of active) {
    if (!rng.chance(sampleP) || injected.outcomes.has(c.id)) continue;
    const term = rng.chance(0.5) ? c.terms[0].text : rng.pick(c.terms).text;
    drafts.push({ concept: c, term, target: c.id, verdict: 'ok', successor: '' });
  }
  const known = (id: string) => injected.oldIndexOf(id) >= 0 || injected.createdIds.has(id);
  const unknown = Math.round(drafts.length * unknownShare);
  const ids = active.map((c) => c.id);
  for (let i = 0; i < unknown && active.length > 0; i++) {
    const c = rng.pick(active);
    const target = unknownId(ids, known, rng);
    drafts.push({ concept: c, term: rng.pick(c.terms).text, target, verdict: 'unknown_target', successor: '' });
  }

  rng.shuffle(drafts);
  const width = Math.max(6, String(drafts.length).length);
  const mappings: GenMapping[] = [];
  const truth: MappingTruth[] = [];
  // Zipf-like usage: rank r (0-based, in a random order) gets about 50000 / (r + 1)^1.1 records.
  const ranks = rng.shuffle(drafts.map((_, i) => i));
  drafts.forEach((d, i) => {
    const local_code = `LC${String(i + 1).padStart(width, '0')}`;
    const category = d.concept?.category ?? '';
    const usage = Math.max(1, Math.round((50000 / (ranks[i] + 1) ** 1.1) * (0.75 + 0.5 * rng.next())));
    mappings.push({ local_code, local_label: localLabel(d.term, category, rng), target_id: d.target, relation: 'exact', usage, owner: OWNERS[category] ?? 'records' });
    truth.push({ local_code, verdict: d.verdict, successor: d.successor });
  });
  return { mappings, truth };
}
