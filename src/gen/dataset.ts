/**
 * generateDataset: the whole ground-truth dataset for one seed: a synthetic base release
 * (vocabulary.ts), the new release with every change kind injected (inject.ts) and a mapping
 * set with its verdicts (mappings.ts). Everything is drawn from seeded streams, so the same
 * options give the same dataset, and `writeDataset` the same bytes.
 */
import { generateVocabulary, type Vocabulary, type VocabularyOptions } from './vocabulary.js';
import { injectChanges, type InjectOptions, type InjectResult } from './inject.js';
import { generateMappings, type MappingOptions } from './mappings.js';
import type { DatasetTables } from './writeDataset.js';

export interface DatasetOptions {
  concepts: number;
  seed: number | string;
  /** About one mapping per this many concepts (default 10). */
  mappingsEvery?: number;
  /** Vocabulary options beyond size and seed. */
  vocabulary?: Partial<Omit<VocabularyOptions, 'concepts' | 'seed'>>;
  /** Injection options beyond the seed (the vocabulary's term source and identifiers are used). */
  inject?: Partial<Omit<InjectOptions, 'seed'>>;
  mappings?: Partial<Omit<MappingOptions, 'seed' | 'every'>>;
}

export interface Dataset extends DatasetTables {
  vocabulary: Vocabulary;
  injected: InjectResult;
}

export function generateDataset(options: DatasetOptions): Dataset {
  const vocabulary = generateVocabulary({ ...options.vocabulary, concepts: options.concepts, seed: options.seed });
  const injected = injectChanges(vocabulary.release, {
    termSource: vocabulary.termSource,
    keyOwners: vocabulary.keyOwners,
    conceptIdFor: vocabulary.conceptIdFor,
    termIdFor: vocabulary.termIdFor,
    indexOf: vocabulary.indexOf,
    ...options.inject,
    seed: options.seed,
  });
  const { mappings, truth } = generateMappings(vocabulary.release, injected, { ...options.mappings, seed: options.seed, every: options.mappingsEvery ?? 10 });
  return {
    vocabulary,
    injected,
    old: vocabulary.release,
    new: injected.newRelease,
    history: injected.history,
    truth: injected.truth,
    mappings,
    mappingTruth: truth,
  };
}
