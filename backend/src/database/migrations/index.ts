import { InitialSchema1796184580000 } from './1796184580000-InitialSchema';
import { Imports1796184590000 } from './1796184590000-Imports';
import { ModelSettings1796184700000 } from './1796184700000-ModelSettings';
import { Advising1796184710000 } from './1796184710000-Advising';

/** Every migration, oldest first. A new migration is added here as well as to this folder. */
export const MIGRATIONS = [
  InitialSchema1796184580000,
  Imports1796184590000,
  ModelSettings1796184700000,
  Advising1796184710000,
];
