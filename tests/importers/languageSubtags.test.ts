/**
 * The Language Subtag Registry importer, checked against two fixed releases of the real
 * registry: the IANA Language Subtag Registry as carried by the npm package
 * `language-subtag-registry`, installed side by side as devDependencies
 *   - `lsr-2014` = language-subtag-registry@0.3.2, File-Date 2014-03-13;
 *   - `lsr-2025` = language-subtag-registry@0.4.2, File-Date 2025-08-25.
 * The packages ship the registry as JSON only (data/json/registry.json + meta.json), so the
 * record-jar reader is checked on the same records written back as record-jar text.
 *
 * Numbers below were measured on those files (they are fixed versions) and are checked
 * twice where possible: by the importer, and by counting the package's raw JSON directly.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  conceptIdOf,
  languageSubtagsToRelease,
  loadLanguageSubtagRegistry,
  parseLanguageSubtagRegistry,
  parseLanguageSubtagRegistryJson,
  descriptionContinues,
  joinFoldedDescriptions,
  parsePreferredTagComment,
  parseSeeComment,
  topLevelElementLines,
  writeReleaseTables,
  type LanguageSubtagRelease,
  type ParsedLanguageSubtagRegistry,
} from '../../src/importers/languageSubtags.js';
import { loadHierarchy, loadHistory, loadRelease } from '../../src/load/index.js';
import { InputError } from '../../src/errors.js';
import { tempDir } from '../helpers/files.js';

const PKG_2014 = join(process.cwd(), 'node_modules', 'lsr-2014');
const PKG_2025 = join(process.cwd(), 'node_modules', 'lsr-2025');

type RawRecord = Record<string, string | string[]>;
const rawRecords = (pkg: string): RawRecord[] => JSON.parse(readFileSync(join(pkg, 'data', 'json', 'registry.json'), 'utf8'));
const rawId = (r: RawRecord) => `${r.Type}:${(r.Subtag ?? r.Tag) as string}`;

const parsed2014 = await loadLanguageSubtagRegistry(PKG_2014);
const parsed2025 = await loadLanguageSubtagRegistry(PKG_2025);
const out2014 = languageSubtagsToRelease(parsed2014);
const out2025 = languageSubtagsToRelease(parsed2025);

const statusById = (o: LanguageSubtagRelease) => new Map(o.release.map((r) => [r.concept_id, r.status]));
const preferredById = (o: LanguageSubtagRelease) => new Map(o.release.filter((r) => r.term_type === 'preferred').map((r) => [r.concept_id, r.term]));
const historyOf = (o: LanguageSubtagRelease, id: string) => o.history.filter((h) => h.old_id === id);
const noteOf = (o: LanguageSubtagRelease, id: string) => o.notes.find((n) => n.id === id);

describe('reading the two registry versions', () => {
  it('reads the File-Date each package ships (IANA Language Subtag Registry, data/json/meta.json)', () => {
    expect(parsed2014.fileDate).toBe('2014-03-13');
    expect(parsed2025.fileDate).toBe('2025-08-25');
    expect(JSON.parse(readFileSync(join(PKG_2014, 'package.json'), 'utf8')).version).toBe('0.3.2');
    expect(JSON.parse(readFileSync(join(PKG_2025, 'package.json'), 'utf8')).version).toBe('0.4.2');
    expect(parsed2014.format).toBe('json');
  });

  it('keeps every record, and counts per type match the raw JSON (File-Date 2014-03-13 and 2025-08-25)', () => {
    for (const [parsed, pkg] of [[parsed2014, PKG_2014], [parsed2025, PKG_2025]] as const) {
      const raw = rawRecords(pkg);
      expect(parsed.accounting).toMatchObject({ recordsRead: raw.length, used: raw.length, rejected: 0 });
      expect(parsed.diagnostics).toEqual([]);
      const byTypeRaw: Record<string, number> = {};
      for (const r of raw) byTypeRaw[r.Type as string] = (byTypeRaw[r.Type as string] ?? 0) + 1;
      const byType: Record<string, number> = {};
      for (const r of parsed.records) byType[r.type] = (byType[r.type] ?? 0) + 1;
      expect(byType).toEqual(byTypeRaw);
    }
    // Measured on IANA Language Subtag Registry, File-Date 2014-03-13 (language-subtag-registry@0.3.2).
    expect(out2014.counts).toMatchObject({
      records: 8936,
      'type.language': 8079,
      'type.extlang': 228,
      'type.script': 168,
      'type.region': 301,
      'type.variant': 67,
      'type.grandfathered': 26,
      'type.redundant': 67,
      conceptsInactive: 143,
    });
    // Measured on IANA Language Subtag Registry, File-Date 2025-08-25 (language-subtag-registry@0.4.2).
    expect(out2025.counts).toMatchObject({
      records: 9281,
      'type.language': 8268,
      'type.extlang': 256,
      'type.script': 225,
      'type.region': 305,
      'type.variant': 134,
      'type.grandfathered': 26,
      'type.redundant': 67,
      conceptsInactive: 298,
    });
  });
});

describe('mapping to release tables', () => {
  it('writes one preferred term per record and one synonym per further Description', () => {
    for (const [out, parsed, pkg] of [[out2014, parsed2014, PKG_2014], [out2025, parsed2025, PKG_2025]] as const) {
      const raw = rawRecords(pkg);
      const descriptions = raw.reduce((n, r) => n + (r.Description as string[]).length, 0) - (parsed.accounting.descriptionPiecesJoined ?? 0);
      expect(out.release).toHaveLength(descriptions);
      expect(out.counts.preferredTerms).toBe(raw.length);
      expect(out.counts.synonyms).toBe(descriptions - raw.length);
    }
    const firstDescription = new Map(rawRecords(PKG_2025).map((r) => [rawId(r), (r.Description as string[])[0]]));
    expect(preferredById(out2025)).toEqual(firstDescription);
  });

  it('marks exactly the records with a Deprecated field inactive, and sets category to the Type', () => {
    const raw = rawRecords(PKG_2025);
    const deprecated = new Set(raw.filter((r) => r.Deprecated !== undefined).map(rawId));
    for (const row of out2025.release) {
      expect(row.status).toBe(deprecated.has(row.concept_id) ? 'inactive' : 'active');
      expect(row.concept_id.startsWith(`${row.category}:`)).toBe(true);
    }
  });

  it('uses Tag for grandfathered and redundant records (IANA registry, File-Date 2025-08-25)', () => {
    const status = statusById(out2025);
    expect(status.get('grandfathered:i-klingon')).toBe('inactive');
    expect(status.get('redundant:zh-Hant')).toBeDefined();
    // i-klingon → tlh: Preferred-Value in the registry file itself.
    expect(historyOf(out2025, 'grandfathered:i-klingon')).toEqual([{ old_id: 'grandfathered:i-klingon', new_id: 'language:tlh', relation: 'replaced_by' }]);
  });

  it('writes a history row per Preferred-Value: replaced_by when deprecated, same_as for extlang', () => {
    for (const [out, pkg] of [[out2014, PKG_2014], [out2025, PKG_2025]] as const) {
      const raw = rawRecords(pkg);
      const withPv = raw.filter((r) => r['Preferred-Value'] !== undefined);
      expect(out.history.filter((h) => h.relation !== 'consider')).toHaveLength(withPv.length);
      expect(out.counts.historyReplacedBy).toBe(withPv.filter((r) => r.Deprecated !== undefined).length);
      expect(out.counts.historySameAs).toBe(withPv.filter((r) => r.Deprecated === undefined).length);
      // Every non-deprecated record with a Preferred-Value is an extlang (RFC 5646 3.1.7 makes it mandatory there).
      expect(new Set(withPv.filter((r) => r.Deprecated === undefined).map((r) => r.Type))).toEqual(new Set(['extlang']));
      expect(out.counts.historyTargetsMissing).toBe(0);
    }
    // Common knowledge: ISO 639 changed Hebrew from iw to he, and ISO 3166 Burma BU to Myanmar MM.
    expect(historyOf(out2025, 'language:iw')).toEqual([{ old_id: 'language:iw', new_id: 'language:he', relation: 'replaced_by' }]);
    expect(historyOf(out2025, 'region:BU')).toEqual([{ old_id: 'region:BU', new_id: 'region:MM', relation: 'replaced_by' }]);
    // extlang yue (Cantonese under the zh prefix) is the same as language yue (registry file itself).
    expect(historyOf(out2025, 'extlang:yue')).toEqual([{ old_id: 'extlang:yue', new_id: 'language:yue', relation: 'same_as' }]);
  });

  it('writes a consider row for every record a deprecated record\'s "see X, Y" comment names', () => {
    // IANA Language Subtag Registry, File-Date 2025-08-25, Comments fields: language:ais "see ami, szy";
    // region:YU "see BA, HR, ME, MK, RS, or SI"; language:duj "see dwu, dwy".
    expect(historyOf(out2025, 'language:ais')).toEqual([
      { old_id: 'language:ais', new_id: 'language:ami', relation: 'consider' },
      { old_id: 'language:ais', new_id: 'language:szy', relation: 'consider' },
    ]);
    expect(historyOf(out2025, 'region:YU').map((h) => `${h.relation} ${h.new_id}`)).toEqual(['BA', 'HR', 'ME', 'MK', 'RS', 'SI'].map((c) => `consider region:${c}`));
    expect(historyOf(out2025, 'language:duj').map((h) => h.new_id)).toEqual(['language:dwu', 'language:dwy']);
    for (const out of [out2014, out2025]) {
      const consider = out.history.filter((h) => h.relation === 'consider');
      // One row per (record, named record): the notes' seeAlso lists, nothing more.
      expect(consider.map((h) => `${h.old_id}>${h.new_id}`)).toEqual(out.notes.flatMap((n) => n.seeAlso.map((s) => `${n.id}>${s}`)));
      expect(out.counts.historyConsider).toBe(consider.length);
      // Only deprecated records get them; "see also X" and "…; see lyg" on active records write none.
      const status = statusById(out);
      expect(consider.every((h) => status.get(h.old_id) === 'inactive')).toBe(true);
    }
    expect(historyOf(out2025, 'language:kha')).toEqual([]);
    expect(historyOf(out2025, 'region:003')).toEqual([]);
    // Measured: 111 rows in the 2014 file (45 lists), 182 in the 2025 file (70 lists).
    expect(out2014.counts.historyConsider).toBe(111);
    expect(out2025.counts.historyConsider).toBe(182);
  });

  it('keeps composite Preferred-Value tags as tag: ids and counts them', () => {
    // IANA registry File-Date 2025-08-25: zh-cmn-Hans → cmn-Hans, zh-cmn-Hant → cmn-Hant, en-GB-oed → en-GB-oxendict.
    expect(out2025.counts.historyTargetsComposite).toBe(3);
    expect(historyOf(out2025, 'grandfathered:en-GB-oed')).toEqual([{ old_id: 'grandfathered:en-GB-oed', new_id: 'tag:en-GB-oxendict', relation: 'replaced_by' }]);
    expect(historyOf(out2025, 'redundant:zh-cmn-Hans')[0].new_id).toBe('tag:cmn-Hans');
    expect(out2014.counts.historyTargetsComposite).toBe(2);
  });

  it('builds the hierarchy from Macrolanguage fields', () => {
    const raw = rawRecords(PKG_2025);
    expect(out2025.hierarchy).toHaveLength(raw.filter((r) => r.Macrolanguage !== undefined).length);
    expect(out2025.counts.hierarchyParentsMissing).toBe(0);
    // Common knowledge: Mandarin (cmn) is encompassed by the macrolanguage Chinese (zh).
    expect(out2025.hierarchy).toContainEqual({ concept_id: 'language:cmn', parent_id: 'language:zh' });
  });
});

describe('what changed between File-Date 2014-03-13 and 2025-08-25', () => {
  // How these were found: we diffed registry.json of language-subtag-registry@0.3.2 and @0.4.2
  // by record id (Type + Subtag/Tag) and listed the records whose Deprecated field is set in
  // 0.4.2 but absent in 0.3.2, with their Preferred-Value and Comments. No record of 2014 is
  // missing in 2025. The test recomputes that list from the importer's tables.
  const s2014 = statusById(out2014);
  const s2025 = statusById(out2025);
  const newlyDeprecated = [...s2025].filter(([id, s]) => s === 'inactive' && s2014.get(id) === 'active').map(([id]) => id);
  const notes = new Map(out2025.notes.map((n) => [n.id, n]));

  it('finds 155 records deprecated in 2025 but not in 2014, 79 of them with a Preferred-Value', () => {
    expect(newlyDeprecated).toHaveLength(155);
    expect(newlyDeprecated.filter((id) => notes.get(id)!.preferredValue !== null)).toHaveLength(79);
    // The same count straight from the raw JSON of both packages.
    const raw2014 = new Map(rawRecords(PKG_2014).map((r) => [rawId(r), r]));
    const rawNewly = rawRecords(PKG_2025).filter((r) => r.Deprecated !== undefined && raw2014.get(rawId(r))?.Deprecated === undefined);
    expect(rawNewly.map(rawId).sort()).toEqual([...newlyDeprecated].sort());
    expect([...s2014.keys()].every((id) => s2025.has(id))).toBe(true);
    const byType: Record<string, number> = {};
    for (const id of newlyDeprecated) byType[id.split(':')[0]] = (byType[id.split(':')[0]] ?? 0) + 1;
    expect(byType).toEqual({ language: 143, extlang: 5, variant: 4, grandfathered: 3 });
  });

  it('finds 24 of them explained by a "see X, Y" comment and 4 by "Preferred tag is X"', () => {
    expect(newlyDeprecated.filter((id) => notes.get(id)!.seeAlso.length > 0)).toHaveLength(24);
    expect(newlyDeprecated.filter((id) => notes.get(id)!.preferredTag !== null)).toHaveLength(4);
    expect(newlyDeprecated.filter((id) => notes.get(id)!.comments.length > 0)).toHaveLength(28);
    // Every subtag a "see" comment names is an active record of the 2025 registry.
    const named = newlyDeprecated.flatMap((id) => notes.get(id)!.seeAlso);
    expect(named).toHaveLength(66);
    expect(named.every((id) => s2025.get(id) === 'active')).toBe(true);
    expect(out2025.counts.seeCodesUnresolved).toBe(0);
  });

  it('language:kzj (Coastal Kadazan) is active in 2014 and replaced by dtp in 2025, merged with kzt, ktr, tdu', () => {
    expect(s2014.get('language:kzj')).toBe('active');
    expect(historyOf(out2014, 'language:kzj')).toEqual([]);
    expect(s2025.get('language:kzj')).toBe('inactive');
    expect(historyOf(out2025, 'language:kzj')).toEqual([{ old_id: 'language:kzj', new_id: 'language:dtp', relation: 'replaced_by' }]);
    expect(notes.get('language:kzj')).toMatchObject({ deprecated: '2016-05-30', preferredValue: 'dtp', preferredId: 'language:dtp' });
    const intoDtp = out2025.history.filter((h) => h.new_id === 'language:dtp').map((h) => h.old_id).sort();
    expect(intoDtp).toEqual(['language:ktr', 'language:kzj', 'language:kzt', 'language:tdu']);
    expect(intoDtp.every((id) => s2014.get(id) === 'active')).toBe(true);
  });

  it('language:ais is split: deprecated without Preferred-Value, "see ami, szy"', () => {
    expect(s2014.get('language:ais')).toBe('active');
    expect(s2025.get('language:ais')).toBe('inactive');
    // No Preferred-Value, so no replaced_by row; the "see" list gives consider rows only.
    expect(historyOf(out2025, 'language:ais').map((h) => h.relation)).toEqual(['consider', 'consider']);
    expect(notes.get('language:ais')).toEqual({
      id: 'language:ais',
      deprecated: '2019-04-16',
      preferredValue: null,
      preferredId: null,
      comments: ['see ami, szy'],
      seeAlso: ['language:ami', 'language:szy'],
      preferredTag: null,
    });
    // szy is new since 2014, ami was already there.
    expect(s2014.has('language:szy')).toBe(false);
    expect(s2014.get('language:ami')).toBe('active');
  });

  it('grandfathered:cel-gaulish points to three language subtags', () => {
    expect(s2014.get('grandfathered:cel-gaulish')).toBe('active');
    expect(notes.get('grandfathered:cel-gaulish')?.seeAlso).toEqual(['language:xcg', 'language:xga', 'language:xtg']);
  });

  it('variant:vaidika keeps both Comments fields; the second names its preferred tag', () => {
    expect(notes.get('variant:vaidika')?.comments).toHaveLength(2);
    expect(notes.get('variant:vaidika')?.preferredTag).toBe('vsn');
  });

  it('sees the preferred term of language:aue change from the ASCII spelling to the click letters', () => {
    expect(preferredById(out2014).get('language:aue')).toBe("=/Kx'au//'ein");
    expect(preferredById(out2025).get('language:aue')).toBe('ǂKxʼauǁʼein');
  });
});

describe('publisher notes from comments', () => {
  it('parses the list forms the registry uses', () => {
    expect(parseSeeComment('see ami, szy')).toEqual(['ami', 'szy']);
    expect(parseSeeComment('see X and Y')).toEqual(['X', 'Y']);
    expect(parseSeeComment('see BQ, CW, and SX')).toEqual(['BQ', 'CW', 'SX']);
    expect(parseSeeComment('see BA, HR, ME, MK, RS, or SI')).toEqual(['BA', 'HR', 'ME', 'MK', 'RS', 'SI']);
    expect(parseSeeComment('see RS for Serbia or ME for Montenegro')).toEqual(['RS', 'ME']);
    expect(parseSeeComment('see ntx')).toEqual(['ntx']);
  });

  it('does not read "see also", prose, or a sentence that merely ends in "see X" as a list', () => {
    expect(parseSeeComment('see also hyw')).toBeNull();
    expect(parseSeeComment('as of 2008-04-21 this subtag does not include Lyngngam; see lyg')).toBeNull();
    expect(parseSeeComment('published by error in Table 1 of ISO 639:1988')).toBeNull();
    expect(parseSeeComment('see the note about this, which is long')).toBeNull();
  });

  it('reads "Preferred tag is X"', () => {
    expect(parsePreferredTagComment('Preferred tag is ja-Latn-alalc97')).toBe('ja-Latn-alalc97');
    expect(parsePreferredTagComment('The preferred tag is unknown')).toBeNull();
  });

  it('resolves region codes of region records (IANA registry File-Date 2025-08-25: YU, CS)', () => {
    expect(noteOf(out2025, 'region:YU')?.seeAlso).toEqual(['region:BA', 'region:HR', 'region:ME', 'region:MK', 'region:RS', 'region:SI']);
    expect(noteOf(out2025, 'region:CS')?.seeAlso).toEqual(['region:RS', 'region:ME']);
  });

  it('has one note per deprecated record', () => {
    expect(out2025.notes).toHaveLength(out2025.counts.conceptsInactive);
    expect(out2014.notes).toHaveLength(143);
    expect(out2014.counts.notesWithSeeList).toBe(45);
    expect(out2025.counts.notesWithSeeList).toBe(70);
  });
});

describe('the two JSON layouts', () => {
  // language-subtag-registry before 0.4 wrote each physical line of a folded field as its own
  // array element (its scripts/importer.js pushes continuation lines like new fields); 0.4.2
  // writes one element per field, unfolded. The 0.4.2 file is the outside check here.
  it('reads 0.3.2 as "lines" and 0.4.2 as "fields" from the package.json', () => {
    expect(parsed2014.jsonLayout).toBe('lines');
    expect(parsed2025.jsonLayout).toBe('fields');
    const raw = rawRecords(PKG_2014);
    const commentPieces = raw.reduce((n, r) => n + (r.Comments ? (r.Comments as string[]).length - 1 : 0), 0);
    expect(parsed2014.accounting.commentPiecesJoined).toBe(commentPieces);
    // language:ia, variant:1959acad and grandfathered:zh-min-nan were folded in the 2014 file.
    expect(parsed2014.accounting.descriptionPiecesJoined).toBe(3);
    expect(parsed2025.accounting.descriptionPiecesJoined).toBe(0);
  });

  it('rebuilds every 2014 Description and Comments field that 2025 still carries unchanged', () => {
    const raw2014 = new Map(rawRecords(PKG_2014).map((r) => [rawId(r), r]));
    const rec2014 = new Map(parsed2014.records.map((r) => [conceptIdOf(r), r]));
    let checkedDescriptions = 0;
    let checkedComments = 0;
    for (const r of rawRecords(PKG_2025)) {
      const old = raw2014.get(rawId(r));
      if (old === undefined) continue;
      const mine = rec2014.get(rawId(r))!;
      // Same text once all pieces are joined → the field list of 2025 is the truth for 2014.
      if ((old.Description as string[]).join(' ') === (r.Description as string[]).join(' ')) {
        expect(mine.descriptions).toEqual(r.Description);
        checkedDescriptions++;
      }
      if (old.Comments !== undefined && r.Comments !== undefined && (old.Comments as string[]).join(' ') === (r.Comments as string[]).join(' ')) {
        expect(mine.comments).toEqual(r.Comments);
        checkedComments++;
      }
    }
    expect(checkedDescriptions).toBeGreaterThan(8500);
    expect(checkedComments).toBeGreaterThan(80);
    // So the fold of language:ia is no change of preferred term between the versions.
    expect(preferredById(out2014).get('language:ia')).toBe('Interlingua (International Auxiliary Language Association)');
    expect(preferredById(out2025).get('language:ia')).toBe(preferredById(out2014).get('language:ia'));
  });

  it('joins a Description piece only when the one before cannot end a Description', () => {
    expect(descriptionContinues('Interlingua (International Auxiliary Language', 'Association)')).toBe(true);
    expect(descriptionContinues('variant of Belarusian as', 'codified in 1959')).toBe(true);
    expect(descriptionContinues('Minnan, Hokkien, Amoy', 'Fujian, Hoklo')).toBe(true);
    expect(descriptionContinues('Spanish', 'Castilian')).toBe(false);
    expect(descriptionContinues('Standard Cornish orthography of Revived Cornish', 'Kernowek Standard')).toBe(false);
    expect(joinFoldedDescriptions(['Swahili (individual language)', 'Kiswahili'])).toEqual(['Swahili (individual language)', 'Kiswahili']);
    // No two adjacent Descriptions of the unfolded 0.4.2 file would be joined.
    for (const r of rawRecords(PKG_2025)) expect(joinFoldedDescriptions(r.Description as string[])).toEqual(r.Description);
  });
});

/** Write records back as record-jar text: fields in JSON order, long lines folded at spaces. */
function toRecordJar(fileDate: string, records: RawRecord[]): string {
  const fold = (line: string): string => {
    if (line.length <= 72) return line;
    const cut = line.lastIndexOf(' ', 72);
    if (cut <= line.indexOf(':') + 1) return line;
    return `${line.slice(0, cut)}\n  ${fold(line.slice(cut + 1))}`;
  };
  const parts = [`File-Date: ${fileDate}`];
  for (const r of records) {
    parts.push('%%');
    for (const [name, value] of Object.entries(r)) for (const v of Array.isArray(value) ? value : [value]) parts.push(fold(`${name}: ${v}`));
  }
  return `${parts.join('\n')}\n`;
}

describe('the record-jar form', () => {
  it('reads the same records from record-jar text as from the JSON (all 9281 records of File-Date 2025-08-25)', () => {
    const raw = rawRecords(PKG_2025);
    const text = toRecordJar('2025-08-25', raw);
    expect(text).toMatch(/\n {2}\S/); // some lines were folded
    const fromJar = parseLanguageSubtagRegistry(text, { file: 'registry.txt' });
    expect(fromJar.fileDate).toBe('2025-08-25');
    expect(fromJar.diagnostics).toEqual([]);
    expect(fromJar.accounting.lines?.continuationLines).toBeGreaterThan(0);
    const strip = (p: ParsedLanguageSubtagRegistry) => p.records.map(({ line: _line, ...rest }) => rest);
    expect(strip(fromJar)).toEqual(strip(parsed2025));
    expect(languageSubtagsToRelease(fromJar).release).toEqual(out2025.release);
  });

  it('loads a record-jar file given by path', async () => {
    const dir = tempDir();
    const path = join(dir, 'language-subtag-registry');
    const { writeFileSync } = await import('node:fs');
    writeFileSync(path, toRecordJar('2014-03-13', rawRecords(PKG_2014).slice(0, 50)));
    const fromFolder = await loadLanguageSubtagRegistry(dir);
    expect(fromFolder.format).toBe('record-jar');
    expect(fromFolder.records).toHaveLength(50);
    expect(fromFolder.records[0].line).toBe(3);
  });

  it('rejects bad records with their line, and accounts for every record', () => {
    const text = [
      'File-Date: 2020-01-01',
      '%%',
      'Subtag: xx',
      'Description: no type',
      '%%',
      'Type: language',
      'Description: no subtag',
      '%%',
      'Type: language',
      'Subtag: aa',
      'Description: Afar',
      '%%',
      'Type: language',
      'Subtag: AA',
      'Description: Afar again',
      '%%',
      'Type: region',
      'Subtag: QQ',
      '%%',
      'Type: language',
      'Subtag: bb',
      'Description: Kept',
      'Deprecated: 2020-01-01',
      'Deprecated: 2021-01-01',
    ].join('\n');
    const p = parseLanguageSubtagRegistry(text, { file: 'bad.txt' });
    expect(p.diagnostics.map((d) => [d.line, d.code, d.severity])).toEqual([
      [3, 'empty_required', 'error'],
      [6, 'empty_required', 'error'],
      [13, 'duplicate_row', 'error'],
      [17, 'empty_required', 'error'],
      [20, 'bad_value', 'warning'],
    ]);
    expect(p.accounting).toMatchObject({ recordsRead: 6, used: 2, rejected: 4 });
    expect(p.records.map(conceptIdOf)).toEqual(['language:aa', 'language:bb']);
    expect(p.records[1].deprecated).toBe('2020-01-01');
  });

  it('throws InputError for a registry without File-Date, or without records', () => {
    expect(() => parseLanguageSubtagRegistry('Type: language\nSubtag: aa\n', { file: 'x' })).toThrow(InputError);
    try {
      parseLanguageSubtagRegistry('Type: language\nSubtag: aa\n', { file: 'x' });
    } catch (e) {
      expect((e as InputError).code).toBe('bad_metadata');
      expect((e as InputError).location).toEqual({ file: 'x', line: 1, column: 1 });
    }
    expect(() => parseLanguageSubtagRegistry('\n\n')).toThrow(expect.objectContaining({ code: 'empty_file' }));
  });
});

describe('the JSON form', () => {
  it('names the line of each record in diagnostics', () => {
    const json = '[\n  {"Type": "language", "Subtag": "aa", "Description": ["Afar"]},\n  {\n    "Subtag": "bb",\n    "Description": ["B \\"quoted\\" ]"]\n  },\n  "not a record"\n]';
    expect(topLevelElementLines(json)).toEqual([2, 3, 7]);
    const p = parseLanguageSubtagRegistryJson(json, '{"File-Date": "2020-01-01"}', { file: 'r.json' });
    expect(p.diagnostics.map((d) => [d.file, d.line, d.code])).toEqual([
      ['r.json', 3, 'empty_required'],
      ['r.json', 7, 'bad_value'],
    ]);
    expect(p.accounting).toMatchObject({ recordsRead: 3, used: 1, rejected: 2 });
  });

  it('throws InputError with a code for broken JSON or a missing File-Date', () => {
    expect(() => parseLanguageSubtagRegistryJson('[{', '{"File-Date": "2020-01-01"}')).toThrow(expect.objectContaining({ code: 'bad_json' }));
    expect(() => parseLanguageSubtagRegistryJson('[]', '{}')).toThrow(expect.objectContaining({ code: 'bad_metadata' }));
    expect(() => parseLanguageSubtagRegistryJson('{}', '{"File-Date": "2020-01-01"}')).toThrow(expect.objectContaining({ code: 'bad_json' }));
  });

  it('throws file_not_found for a folder without a registry', async () => {
    await expect(loadLanguageSubtagRegistry(tempDir())).rejects.toMatchObject({ code: 'file_not_found' });
  });
});

describe('written tables', () => {
  it('load back through termdrift’s own loaders with no diagnostics (File-Date 2014-03-13)', async () => {
    const dir = tempDir();
    const written = await writeReleaseTables(dir, { release: out2014.release, history: out2014.history, hierarchy: out2014.hierarchy });
    expect(written.files.map((f) => f.slice(dir.length + 1))).toEqual(['release.tsv', 'history.tsv', 'hierarchy.tsv']);
    const release = await loadRelease(join(dir, 'release.tsv'));
    expect(release.diagnostics).toEqual([]);
    expect(release.conceptCount).toBe(8936);
    expect(release.termCount).toBe(out2014.release.length);
    // Descriptions that begin with a double quote survive (variant 1959acad).
    expect(written.counts.quotedFields).toBe(out2014.release.filter((r) => r.term.startsWith('"')).length);
    expect(written.counts.quotedFields).toBe(1);
    const c = release.conceptIndex.get('variant:1959acad')!;
    const firstTerm = release.conceptTerms[release.conceptTermStart[c]];
    expect(release.termText[firstTerm]).toBe(preferredById(out2014).get('variant:1959acad'));
    expect(release.termText[firstTerm].startsWith('"')).toBe(true);
    const history = await loadHistory(join(dir, 'history.tsv'));
    expect(history.diagnostics).toEqual([]);
    expect(history.accounting.used).toBe(out2014.history.length);
    const hierarchy = await loadHierarchy(join(dir, 'hierarchy.tsv'));
    expect(hierarchy.diagnostics).toEqual([]);
    expect(hierarchy.accounting.used).toBe(out2014.hierarchy.length);
  });
});
