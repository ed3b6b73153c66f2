/** The registered detectors, one per change kind. Adding a kind: one file here and one entry. */
import type { ChangeKind } from '../types.js';
import type { Detector } from '../detector.js';
import { addition } from './addition.js';
import { retirement } from './retirement.js';
import { replacement } from './replacement.js';
import { merge } from './merge.js';
import { split } from './split.js';
import { reorganization } from './reorganization.js';
import { movedSynonym } from './movedSynonym.js';
import { preferredTermChange } from './preferredTermChange.js';
import { synonymAdded } from './synonymAdded.js';
import { synonymRemoved } from './synonymRemoved.js';
import { idReuse } from './idReuse.js';
import { categoryChange } from './categoryChange.js';
import { hierarchyChange } from './hierarchyChange.js';

export const DETECTORS: { [K in ChangeKind]: Detector<K> } = {
  id_reuse: idReuse,
  retirement,
  merge,
  split,
  replacement,
  reorganization,
  moved_synonym: movedSynonym,
  preferred_term_change: preferredTermChange,
  category_change: categoryChange,
  hierarchy_change: hierarchyChange,
  synonym_removed: synonymRemoved,
  synonym_added: synonymAdded,
  addition,
};
