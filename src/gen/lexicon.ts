/**
 * The invented clinical-sounding vocabulary of the synthetic terminology: word tables and one
 * naming scheme per category.
 *
 * A concept is a *core*: one value per dimension of its category's scheme (for a disorder:
 * process, site, part, laterality, acuity, severity, cause, type), packed into one number in
 * mixed radix. `names(core)` renders every way of naming it — canonical name first, then
 * word-order variants, "of the" phrases, comma-inverted index forms, adjective forms of the
 * site ("renal" for kidney) and abbreviations ("L dist femur fx"). Every name of a core
 * carries every dimension's value, so the names of one concept are genuine variants, while
 * concepts that differ in one dimension share the other words (hard negatives).
 *
 * The words are ordinary English anatomy and process words; the substance and organism names
 * are made of invented syllables. Nothing is taken from a published terminology.
 */
import type { Rng } from './random.js';

export interface Site {
  name: string;
  /** Adjective form ("renal"), or '' when none is used. */
  adj: string;
  /** Has a left and a right. */
  paired: boolean;
}

const S = (name: string, adj = '', paired = false): Site => ({ name, adj, paired });

export const SITES: readonly Site[] = [
  S('femur', '', true), S('tibia', '', true), S('fibula', '', true), S('humerus', '', true), S('radius', '', true),
  S('ulna', '', true), S('clavicle', '', true), S('scapula', '', true), S('patella', '', true), S('rib', '', true),
  S('pelvis'), S('sacrum'), S('mandible'), S('maxilla'), S('sternum'), S('knee', '', true), S('hip', '', true),
  S('ankle', '', true), S('wrist', '', true), S('elbow', '', true), S('shoulder', '', true), S('hand', '', true),
  S('foot', '', true), S('thumb', '', true), S('forearm', '', true), S('thigh', '', true), S('calf', '', true),
  S('kidney', 'renal', true), S('ureter', 'ureteric', true), S('bladder', 'vesical'), S('liver', 'hepatic'),
  S('gallbladder'), S('pancreas', 'pancreatic'), S('spleen', 'splenic'), S('stomach', 'gastric'),
  S('duodenum', 'duodenal'), S('colon', 'colonic'), S('rectum', 'rectal'), S('oesophagus', 'oesophageal'),
  S('lung', 'pulmonary', true), S('bronchus', 'bronchial', true), S('trachea', 'tracheal'), S('larynx', 'laryngeal'),
  S('nose', 'nasal'), S('ear', 'aural', true), S('eye', 'ocular', true), S('eyelid', 'palpebral', true),
  S('cornea', 'corneal', true), S('retina', 'retinal', true), S('brain', 'cerebral'), S('heart', 'cardiac'),
  S('aorta', 'aortic'), S('skin', 'cutaneous'), S('breast', 'mammary', true), S('ovary', 'ovarian', true),
  S('uterus', 'uterine'), S('testis', 'testicular', true), S('prostate', 'prostatic'), S('tongue', 'lingual'),
  S('neck', 'cervical'), S('spine', 'spinal'), S('scalp'), S('groin', 'inguinal', true), S('buttock', 'gluteal', true),
  S('heel', '', true), S('toe', '', true), S('jaw'), S('chest wall'), S('abdominal wall'), S('adrenal gland', 'adrenal', true),
];

/** Part of a site; index 0 is "no part". Abbreviation '' when none. */
export const PARTS: readonly (readonly [string, string])[] = [
  ['', ''], ['proximal', 'prox'], ['distal', 'dist'], ['anterior', 'ant'], ['posterior', 'post'], ['medial', 'med'],
  ['lateral', 'lat'], ['superior', 'sup'], ['inferior', 'inf'], ['superficial', 'superf'], ['deep', ''],
];

export const LATERALITY: readonly (readonly [string, string])[] = [['', ''], ['left', 'L'], ['right', 'R'], ['bilateral', 'bilat']];

export const PROCESSES: readonly (readonly [string, string])[] = [
  ['fracture', 'fx'], ['dislocation', 'disloc'], ['inflammation', ''], ['abscess', ''], ['cyst', ''], ['ulcer', ''],
  ['stenosis', ''], ['haemorrhage', 'haem'], ['infarction', ''], ['necrosis', ''], ['benign neoplasm', ''],
  ['malignant neoplasm', 'ca'], ['hernia', ''], ['atrophy', ''], ['hypertrophy', ''], ['fibrosis', ''], ['calculus', ''],
  ['obstruction', 'obstr'], ['torsion', ''], ['laceration', 'lac'], ['contusion', ''], ['fistula', ''], ['perforation', 'perf'],
  ['ischaemia', ''], ['oedema', ''], ['polyp', ''], ['aneurysm', ''], ['thrombosis', ''], ['infection', ''], ['injury', ''],
  ['deformity', ''], ['prolapse', ''], ['dysplasia', ''], ['erosion', ''],
];

const ACUITY = ['', 'acute', 'chronic', 'subacute', 'recurrent'];
const SEVERITY = ['', 'mild', 'moderate', 'severe'];
const CAUSE = ['', 'due to trauma', 'due to infection', 'following surgery', 'due to pressure'];
const TYPE = ['', 'type 1', 'type 2', 'type 3', 'type 4'];

/** Findings with the preposition their canonical name takes. */
export const FINDINGS: readonly (readonly [string, string])[] = [
  ['pain', 'in'], ['swelling', 'of'], ['tenderness', 'of'], ['stiffness', 'of'], ['numbness', 'of'], ['weakness', 'of'],
  ['itching', 'of'], ['redness', 'of'], ['bruising', 'of'], ['lump', 'in'], ['discharge', 'from'], ['tingling', 'in'],
  ['cramp', 'in'], ['spasm', 'of'], ['discolouration', 'of'], ['reduced sensation', 'in'], ['limited movement', 'of'],
  ['crepitus', 'of'], ['warmth', 'of'], ['instability', 'of'],
];
const TIMING = ['', 'intermittent', 'persistent', 'episodic', 'nocturnal', 'on exertion', 'at rest'];
const TIMING_ADJECTIVE = new Set(['intermittent', 'persistent', 'episodic', 'nocturnal']);
/** Prepositions of FINDINGS that are stop words of the lexical key (text/normalize.ts STOP_WORDS). */
const STOP_PREPOSITIONS = new Set(['in', 'of']);

export const ACTIONS: readonly (readonly [string, string])[] = [
  ['excision', 'exc'], ['biopsy', 'bx'], ['repair', ''], ['drainage', ''], ['incision', ''], ['fixation', ''],
  ['reconstruction', 'recon'], ['resection', ''], ['aspiration', ''], ['injection', 'inj'], ['removal', ''],
  ['decompression', ''], ['stabilisation', ''], ['exploration', ''], ['debridement', ''], ['ultrasound scan', 'US scan'],
  ['magnetic resonance imaging', 'MRI'], ['computed tomography', 'CT'], ['radiography', 'X-ray'], ['denervation', ''],
];
const APPROACH: readonly (readonly [string, string])[] = [
  ['', ''], ['open', ''], ['laparoscopic', 'lap'], ['endoscopic', 'endo'], ['percutaneous', 'perc'], ['arthroscopic', 'arthro'], ['robotic', ''],
];
const EXTENT = ['', 'partial', 'total', 'revision', 'primary', 'repeat'];

export const ANALYTES: readonly (readonly [string, string])[] = [
  ['sodium', 'Na'], ['potassium', 'K'], ['chloride', 'Cl'], ['bicarbonate', 'HCO3'], ['calcium', 'Ca'], ['magnesium', 'Mg'],
  ['phosphate', 'PO4'], ['glucose', 'Glu'], ['urea', ''], ['creatinine', 'Cr'], ['albumin', 'Alb'], ['total protein', 'TP'],
  ['bilirubin', 'Bili'], ['haemoglobin', 'Hb'], ['ferritin', ''], ['iron', 'Fe'], ['transferrin', ''], ['cholesterol', 'Chol'],
  ['triglyceride', 'TG'], ['lactate', ''], ['cortisol', ''], ['insulin', ''], ['amylase', ''], ['lipase', ''], ['urate', ''],
  ['ammonia', 'NH3'], ['copper', 'Cu'], ['zinc', 'Zn'], ['folate', ''], ['osmolality', 'Osm'], ['ketones', ''],
  ['alkaline phosphatase', 'ALP'], ['lithium', 'Li'], ['ethanol', 'EtOH'], ['caeruloplasmin', ''], ['haptoglobin', ''],
];
const SPECIMENS: readonly (readonly [string, string])[] = [
  ['serum', ''], ['plasma', ''], ['urine', ''], ['whole blood', 'WB'], ['cerebrospinal fluid', 'CSF'], ['saliva', ''], ['capillary blood', 'cap blood'],
];
const LAB_TIMING = ['', 'fasting', 'random', '2 hour', 'trough', 'peak', 'timed'];
const METHOD = ['', 'by immunoassay', 'by enzymatic method', 'by test strip', 'by mass spectrometry'];

// Invented substance names: syllable × syllable × syllable × stem.
const SUB_P1 = ['al', 'ben', 'car', 'dex', 'el', 'fen', 'gal', 'hex', 'ir', 'jor', 'ket', 'lor', 'mer', 'nor', 'ox', 'pra', 'quin', 'ros', 'sul', 'tam', 'ver', 'zan'];
const SUB_P2 = ['a', 'e', 'i', 'o', 'u', 'ax', 'ev', 'il', 'ob', 'ur', 'am', 'ith', 'ol', 'yl'];
const SUB_P3 = ['', 'li', 'mo', 'ra', 'ta', 'do', 'ne', 'si', 'vo', 'zu', 'ca'];
const SUB_STEM = ['zole', 'mide', 'pine', 'lol', 'pril', 'sartan', 'statin', 'mycin', 'cillin', 'vir', 'mab', 'tide', 'dronate', 'parin', 'olone', 'azine', 'oxacin', 'fenac'];
const SALTS: readonly (readonly [string, string])[] = [
  ['', ''], ['hydrochloride', 'HCl'], ['sodium', 'Na'], ['sulfate', ''], ['acetate', ''], ['citrate', ''], ['phosphate', ''],
];
export const SUBSTANCE_NAMES = SUB_P1.length * SUB_P2.length * SUB_P3.length * SUB_STEM.length;

/** The invented name of substance `i` (0 ≤ i < SUBSTANCE_NAMES), capitalised. */
export function substanceName(i: number): string {
  let k = i;
  const a = SUB_P1[k % SUB_P1.length]; k = Math.floor(k / SUB_P1.length);
  const b = SUB_P2[k % SUB_P2.length]; k = Math.floor(k / SUB_P2.length);
  const c = SUB_P3[k % SUB_P3.length]; k = Math.floor(k / SUB_P3.length);
  return cap(a + b + c + SUB_STEM[k]);
}

/** A development code for substance `i`: two letters, a hyphen, four digits; one per name. */
export function substanceCode(i: number): string {
  const block = Math.floor(i / 9000);
  const letters = String.fromCharCode(65 + (block % 26)) + String.fromCharCode(65 + (Math.floor(block / 26) % 26));
  return `${letters}-${1000 + (i % 9000)}`;
}

// Invented organisms: genus and species epithets from syllables.
const GEN_P1 = ['Ar', 'Bor', 'Cal', 'Dor', 'Ep', 'Fal', 'Gor', 'Hal', 'Is', 'Kor', 'Lam', 'Mar', 'Nov', 'Or', 'Pel', 'Ryn', 'Sal', 'Tor', 'Ul', 'Ver'];
const GEN_P2 = ['a', 'e', 'i', 'o', 'u', 'an', 'en', 'in', 'on', 'ul', 'ar', 'is'];
const GEN_SUF = ['bacter', 'coccus', 'bacillus', 'monas', 'myces', 'ella', 'spora', 'vibrio', 'plasma', 'cystis'];
const SPE_P1 = ['al', 'bor', 'cor', 'del', 'fer', 'gran', 'hum', 'lat', 'mont', 'nig', 'or', 'pal', 'rub', 'sil', 'ten', 'umbr', 'ver', 'vir', 'fluv', 'terr'];
const SPE_P2 = ['', 'ul', 'er', 'an', 'on', 'it', 'ar', 'ic'];
const SPE_SUF = ['ensis', 'alis', 'icus', 'osus', 'ii', 'ae', 'ina', 'atum'];
const ORG_QUALIFIER: readonly (readonly [string, string])[] = [
  ['', ''], ['serotype A', 'sero A'], ['serotype B', 'sero B'], ['serotype C', 'sero C'], ['biovar 1', 'bv 1'], ['biovar 2', 'bv 2'], ['strain K', ''], ['subspecies minor', 'subsp. minor'],
];

const TISSUES = ['', 'bone', 'skin', 'muscle', 'joint', 'blood vessel', 'nerve', 'soft tissue', 'cartilage', 'ligament', 'tendon', 'fascia'];
/** Sites SITES[0..LIMB_SITES) are bones and limb regions, the only ones given a tissue. */
const LIMB_SITES = 27;
const SEGMENTS = 13; // 0 = none, 1..12

/** "a b  c" → "a b c": join non-empty parts with one space. */
function join(...parts: string[]): string {
  let out = '';
  for (const p of parts) if (p !== '') out = out === '' ? p : `${out} ${p}`;
  return out;
}

export function cap(s: string): string {
  return s === '' ? s : s.charAt(0).toUpperCase() + s.slice(1);
}

/**
 * `join` with its first non-empty part capitalised: names start with a capital letter.
 * Capitalising the first part rather than the joined name keeps the name unflattened until
 * it is folded (measured: capitalising whole names cost 5% of the vocabulary's time).
 */
function capJoin(...parts: string[]): string {
  let out = '';
  for (const p of parts) if (p !== '') out = out === '' ? cap(p) : `${out} ${p}`;
  return out;
}

/** ", a, b" for the non-empty parts. */
function commas(...parts: string[]): string {
  let out = '';
  for (const p of parts) if (p !== '') out += `, ${p}`;
  return out;
}

/** A category's naming scheme. */
export interface Scheme {
  category: string;
  /** Size of each dimension of a core. */
  radix: readonly number[];
  /** Draw a core's dimension values (weighted like a real terminology: most modifiers absent). */
  draw(rng: Rng, out: number[]): void;
  /** Draw every dimension uniformly (used when the weighted draw keeps hitting taken cores). */
  drawUniform(rng: Rng, out: number[]): void;
  /**
   * Every name of the core, canonical first (only the canonical one when `all` is false);
   * duplicates possible. The first `sameKey` names after the canonical one (see NameList) use
   * exactly the canonical name's words, up to order, stop words and punctuation, so they have
   * its lexical key (checked in tests/gen/vocabulary.test.ts).
   */
  names(d: readonly number[], all?: boolean): NameList;
}

/** Names of a core: `[canonical, ...same-key variants, ...other variants]`, with `sameKey` the count of the middle part. */
export type NameList = string[] & { sameKey?: number };

function nameList(first: string, same: string[], other: string[]): NameList {
  const out: NameList = [first, ...same, ...other];
  out.sameKey = same.length;
  return out;
}

function uniform(radix: readonly number[]) {
  return (rng: Rng, out: number[]) => {
    for (let i = 0; i < radix.length; i++) out[i] = rng.int(radix[i]);
  };
}

/** Index 0 with probability `none`, else uniform over 1..n-1. */
function mostlyNone(rng: Rng, n: number, none: number): number {
  return n <= 1 || rng.chance(none) ? 0 : 1 + rng.int(n - 1);
}

function drawLaterality(rng: Rng, site: Site): number {
  if (!site.paired) return 0;
  const x = rng.next();
  return x < 0.2 ? 0 : x < 0.55 ? 1 : x < 0.9 ? 2 : 3;
}

/** Location words "left distal femur" and the abbreviated "L dist femur". */
function location(site: Site, part: number, lat: number) {
  const [pt, pta] = PARTS[part];
  const [l, la] = LATERALITY[lat];
  return {
    full: join(l, pt, site.name),
    abbr: join(la || l, pta || pt, site.name),
    adj: site.adj ? join(l, pt, site.adj) : '',
    abbreviated: la !== '' || pta !== '',
  };
}

const disorder: Scheme = {
  category: 'disorder',
  radix: [PROCESSES.length, SITES.length, PARTS.length, LATERALITY.length, ACUITY.length, SEVERITY.length, CAUSE.length, TYPE.length],
  draw(rng, d) {
    d[0] = rng.int(PROCESSES.length);
    d[1] = rng.int(SITES.length);
    d[2] = mostlyNone(rng, PARTS.length, 0.6);
    d[3] = drawLaterality(rng, SITES[d[1]]);
    d[4] = mostlyNone(rng, ACUITY.length, 0.5);
    d[5] = mostlyNone(rng, SEVERITY.length, 0.7);
    d[6] = mostlyNone(rng, CAUSE.length, 0.75);
    d[7] = mostlyNone(rng, TYPE.length, 0.8);
  },
  drawUniform(rng, d) {
    uniform(this.radix)(rng, d);
    if (!SITES[d[1]].paired) d[3] = 0;
  },
  names(d, all = true) {
    const [p, pa] = PROCESSES[d[0]];
    const site = SITES[d[1]];
    const loc = location(site, d[2], d[3]);
    const mods = join(ACUITY[d[4]], SEVERITY[d[5]]);
    const cause = CAUSE[d[6]];
    const type = TYPE[d[7]];
    const tail = (cause ? ` ${cause}` : '') + (type ? `, ${type}` : '');
    const first = capJoin(mods, p, 'of', loc.full) + tail;
    if (!all) return [first];
    const same = [
      capJoin(loc.full, p) + (mods ? `, ${mods}` : '') + tail,
      capJoin(mods, p, 'of the', loc.full) + tail,
      capJoin(p, 'of', site.name) + commas(PARTS[d[2]][0], LATERALITY[d[3]][0], mods, cause, type),
    ];
    if (type) same.push(capJoin(type, mods, p, 'of', loc.full) + (cause ? ` ${cause}` : ''));
    const other: string[] = [];
    if (loc.adj) other.push(capJoin(mods, loc.adj, p) + tail);
    if (pa || loc.abbreviated) other.push(capJoin(loc.abbr, pa || p) + (mods ? `, ${mods}` : '') + tail);
    return nameList(first, same, other);
  },
};

const finding: Scheme = {
  category: 'finding',
  radix: [FINDINGS.length, SITES.length, PARTS.length, LATERALITY.length, TIMING.length, SEVERITY.length],
  draw(rng, d) {
    d[0] = rng.int(FINDINGS.length);
    d[1] = rng.int(SITES.length);
    d[2] = mostlyNone(rng, PARTS.length, 0.7);
    d[3] = drawLaterality(rng, SITES[d[1]]);
    d[4] = mostlyNone(rng, TIMING.length, 0.6);
    d[5] = mostlyNone(rng, SEVERITY.length, 0.7);
  },
  drawUniform(rng, d) {
    uniform(this.radix)(rng, d);
    if (!SITES[d[1]].paired) d[3] = 0;
  },
  names(d, all = true) {
    const [f, prep] = FINDINGS[d[0]];
    const site = SITES[d[1]];
    const loc = location(site, d[2], d[3]);
    const timing = TIMING[d[4]];
    const sev = SEVERITY[d[5]];
    const mods = join(sev, timing);
    const first = capJoin(sev, f, prep, loc.full) + (timing ? `, ${timing}` : '');
    if (!all) return [first];
    const same = [
      capJoin(sev, f, prep, 'the', loc.full) + (timing ? `, ${timing}` : ''),
      capJoin(f, prep, site.name) + commas(PARTS[d[2]][0], LATERALITY[d[3]][0], sev, timing),
    ];
    if (TIMING_ADJECTIVE.has(timing)) same.push(capJoin(timing, sev, f, prep, loc.full));
    const other: string[] = [];
    // Without the preposition: the same key only when the preposition is a stop word.
    (STOP_PREPOSITIONS.has(prep) ? same : other).push(capJoin(loc.full, f) + (mods ? `, ${mods}` : ''));
    if (loc.adj) other.push(capJoin(mods, loc.adj, f));
    if (loc.abbreviated) other.push(capJoin(loc.abbr, f) + (mods ? `, ${mods}` : ''));
    return nameList(first, same, other);
  },
};

const procedure: Scheme = {
  category: 'procedure',
  radix: [ACTIONS.length, SITES.length, PARTS.length, LATERALITY.length, APPROACH.length, EXTENT.length],
  draw(rng, d) {
    d[0] = rng.int(ACTIONS.length);
    d[1] = rng.int(SITES.length);
    d[2] = mostlyNone(rng, PARTS.length, 0.7);
    d[3] = drawLaterality(rng, SITES[d[1]]);
    d[4] = mostlyNone(rng, APPROACH.length, 0.4);
    d[5] = mostlyNone(rng, EXTENT.length, 0.5);
  },
  drawUniform(rng, d) {
    uniform(this.radix)(rng, d);
    if (!SITES[d[1]].paired) d[3] = 0;
  },
  names(d, all = true) {
    const [a, aa] = ACTIONS[d[0]];
    const site = SITES[d[1]];
    const loc = location(site, d[2], d[3]);
    const [ap, apa] = APPROACH[d[4]];
    const ext = EXTENT[d[5]];
    const first = capJoin(ap, ext, a, 'of', loc.full);
    if (!all) return [first];
    const same = [
      capJoin(ext, a, 'of', site.name) + commas(PARTS[d[2]][0], LATERALITY[d[3]][0], ap),
      capJoin(ap, ext, loc.full, a),
      capJoin(ap, ext, a, 'of the', loc.full),
    ];
    const other: string[] = [];
    if (loc.adj) other.push(capJoin(ap, ext, loc.adj, a));
    if (aa || apa || loc.abbreviated) other.push(capJoin(apa || ap, ext, aa || a, loc.abbr));
    return nameList(first, same, other);
  },
};

const ANALYTE_COUNT = ANALYTES.length + SUBSTANCE_NAMES;

function analyte(i: number): readonly [string, string] {
  return i < ANALYTES.length ? ANALYTES[i] : [substanceName(i - ANALYTES.length).toLowerCase(), ''];
}

const labTest: Scheme = {
  category: 'lab test',
  radix: [ANALYTE_COUNT, SPECIMENS.length, LAB_TIMING.length, METHOD.length],
  draw(rng, d) {
    d[0] = rng.chance(0.3) ? rng.int(ANALYTES.length) : ANALYTES.length + rng.int(SUBSTANCE_NAMES);
    d[1] = rng.chance(0.5) ? rng.int(2) : rng.int(SPECIMENS.length);
    d[2] = mostlyNone(rng, LAB_TIMING.length, 0.6);
    d[3] = mostlyNone(rng, METHOD.length, 0.6);
  },
  drawUniform: (rng, d) => {
    d[0] = rng.int(ANALYTE_COUNT);
    d[1] = rng.int(SPECIMENS.length);
    d[2] = rng.int(LAB_TIMING.length);
    d[3] = rng.int(METHOD.length);
  },
  names(d, all = true) {
    const [an, ana] = analyte(d[0]);
    const [sp, spa] = SPECIMENS[d[1]];
    const tm = LAB_TIMING[d[2]];
    const me = METHOD[d[3]];
    const m = me ? ` ${me}` : '';
    const first = capJoin(tm, an, 'measurement in', sp) + m;
    if (!all) return [first];
    const same = [capJoin('measurement of', tm, an, 'in', sp) + m];
    const other = [
      capJoin(tm, sp, an, 'level') + m,
      capJoin(an, 'concentration in', sp) + commas(tm, me),
      cap(an) + commas(sp, tm, me),
    ];
    if (ana || spa) other.push(capJoin(tm, spa || sp, ana || an) + m);
    return nameList(first, same, other);
  },
};

const substance: Scheme = {
  category: 'substance',
  radix: [SUBSTANCE_NAMES, SALTS.length],
  draw(rng, d) {
    d[0] = rng.int(SUBSTANCE_NAMES);
    d[1] = mostlyNone(rng, SALTS.length, 0.55);
  },
  drawUniform: uniform([SUBSTANCE_NAMES, SALTS.length]),
  names(d, all = true) {
    const name = substanceName(d[0]);
    const [salt, sa] = SALTS[d[1]];
    const first = join(name, salt);
    if (!all) return [first];
    const same: string[] = [];
    const other = [join(substanceCode(d[0]), sa || salt)];
    if (sa) other.push(join(name, sa));
    if (salt) {
      other.push(`${name} (as ${salt})`);
      same.push(`${cap(salt)} of ${name.toLowerCase()}`);
    } else other.push(`${name} base`);
    return nameList(first, same, other);
  },
};

const GENERA = GEN_P1.length * GEN_P2.length * GEN_SUF.length;
const SPECIES = SPE_P1.length * SPE_P2.length * SPE_SUF.length;

function genus(i: number): string {
  return GEN_P1[i % GEN_P1.length] + GEN_P2[Math.floor(i / GEN_P1.length) % GEN_P2.length] + GEN_SUF[Math.floor(i / (GEN_P1.length * GEN_P2.length))];
}

function species(i: number): string {
  return SPE_P1[i % SPE_P1.length] + SPE_P2[Math.floor(i / SPE_P1.length) % SPE_P2.length] + SPE_SUF[Math.floor(i / (SPE_P1.length * SPE_P2.length))];
}

const organism: Scheme = {
  category: 'organism',
  radix: [GENERA, SPECIES, ORG_QUALIFIER.length],
  draw(rng, d) {
    d[0] = rng.int(GENERA);
    d[1] = rng.int(SPECIES);
    d[2] = mostlyNone(rng, ORG_QUALIFIER.length, 0.6);
  },
  drawUniform: uniform([GENERA, SPECIES, ORG_QUALIFIER.length]),
  names(d, all = true) {
    const g = genus(d[0]);
    const s = species(d[1]);
    const [q, qa] = ORG_QUALIFIER[d[2]];
    const first = join(g, s, q);
    if (!all) return [first];
    const same = q ? [`${g} ${s}, ${q}`] : [];
    const other = [join(`${g.charAt(0)}.`, s, q), `${g} species ${s}` + (q ? ` ${q}` : '')];
    if (qa) other.push(join(g, s, qa));
    return nameList(first, same, other);
  },
};

const bodyStructure: Scheme = {
  category: 'body structure',
  radix: [TISSUES.length, SITES.length, PARTS.length, LATERALITY.length, SEGMENTS],
  draw(rng, d) {
    d[1] = rng.int(SITES.length);
    d[0] = d[1] < LIMB_SITES ? mostlyNone(rng, TISSUES.length, 0.3) : 0;
    d[2] = mostlyNone(rng, PARTS.length, 0.4);
    d[3] = drawLaterality(rng, SITES[d[1]]);
    d[4] = mostlyNone(rng, SEGMENTS, 0.5);
  },
  drawUniform(rng, d) {
    uniform(this.radix)(rng, d);
    if (!SITES[d[1]].paired) d[3] = 0;
    if (d[1] >= LIMB_SITES) d[0] = 0;
  },
  names(d, all = true) {
    const tissue = TISSUES[d[0]] || 'structure';
    const site = SITES[d[1]];
    const loc = location(site, d[2], d[3]);
    const seg = d[4] ? `, segment ${d[4]}` : '';
    const first = capJoin(tissue, 'of', loc.full) + seg;
    if (!all) return [first];
    const same = [
      capJoin(loc.full, tissue) + seg,
      cap(site.name) + commas(PARTS[d[2]][0], LATERALITY[d[3]][0], tissue) + seg,
      capJoin(tissue, 'of the', loc.full) + seg,
    ];
    if (d[4]) same.push(capJoin('segment', String(d[4]), 'of', loc.full, tissue));
    const other: string[] = [];
    if (loc.adj) other.push(capJoin(loc.adj, tissue) + seg);
    if (loc.abbreviated || d[4]) other.push(capJoin(loc.abbr, tissue) + (d[4] ? `, seg ${d[4]}` : ''));
    return nameList(first, same, other);
  },
};

/** The schemes, by category name. */
export const SCHEMES: Readonly<Record<string, Scheme>> = {
  disorder,
  finding,
  procedure,
  'lab test': labTest,
  substance,
  organism,
  'body structure': bodyStructure,
};

/** Default share of each category among the concepts. */
export const DEFAULT_CATEGORY_WEIGHTS: Readonly<Record<string, number>> = {
  disorder: 0.3,
  finding: 0.12,
  procedure: 0.2,
  'lab test': 0.1,
  substance: 0.12,
  organism: 0.08,
  'body structure': 0.08,
};

/** Pack dimension values into one number (mixed radix, first dimension lowest). */
export function packCore(radix: readonly number[], d: readonly number[]): number {
  let v = 0;
  let m = 1;
  for (let i = 0; i < radix.length; i++) {
    v += d[i] * m;
    m *= radix[i];
  }
  return v;
}

export function unpackCore(radix: readonly number[], v: number, out: number[]): number[] {
  let k = v;
  for (let i = 0; i < radix.length; i++) {
    out[i] = k % radix[i];
    k = Math.floor(k / radix[i]);
  }
  out.length = radix.length;
  return out;
}

for (const s of Object.values(SCHEMES)) {
  const size = s.radix.reduce((a, b) => a * b, 1);
  if (!Number.isSafeInteger(size)) throw new Error(`scheme ${s.category}: core space ${size} exceeds 2^53`);
}
