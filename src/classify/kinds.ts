/**
 * What each change kind means, in one table. A kind added to CHANGE_KINDS without an entry
 * here does not compile. `rank` orders kinds in reports (most dangerous first).
 */
import type { ChangeKind } from './types.js';

export interface ChangeKindInfo {
  title: string;
  /** One sentence for reviewers. */
  meaning: string;
  /** Does the kind change what a code means (structural) or only how it is named? */
  structural: boolean;
}

export const CHANGE_KIND_INFO: Record<ChangeKind, ChangeKindInfo> = {
  id_reuse: { title: 'Identifier reused', meaning: 'The identifier is kept but now names something lexically unrelated: the meaning changed under a kept code.', structural: true },
  retirement: { title: 'Retired', meaning: 'The concept became inactive or disappeared, and its terms went nowhere.', structural: true },
  merge: { title: 'Merged', meaning: 'Two or more old concepts are now carried by one concept.', structural: true },
  split: { title: 'Split', meaning: 'One old concept is now carried by two or more concepts.', structural: true },
  replacement: { title: 'Replaced', meaning: 'The concept was retired and its meaning carried by one concept with a new identifier.', structural: true },
  reorganization: { title: 'Reorganized', meaning: 'Several old concepts were redistributed over several new ones; see the flow of terms.', structural: true },
  moved_synonym: { title: 'Synonym moved', meaning: 'A term left one concept for another.', structural: false },
  preferred_term_change: { title: 'Preferred term changed', meaning: 'The concept is named differently.', structural: false },
  category_change: { title: 'Category changed', meaning: 'The semantic category of the concept changed.', structural: false },
  hierarchy_change: { title: 'Parents changed', meaning: 'The concept sits under different parents.', structural: false },
  synonym_removed: { title: 'Synonyms removed', meaning: 'Terms of the concept are gone.', structural: false },
  synonym_added: { title: 'Synonyms added', meaning: 'The concept has new terms.', structural: false },
  addition: { title: 'New concept', meaning: 'A concept whose terms did not exist before.', structural: false },
};
