import { InitialSchema1796184580000 } from './1796184580000-InitialSchema';
import { Imports1796184590000 } from './1796184590000-Imports';
import { ModelSettings1796184700000 } from './1796184700000-ModelSettings';
import { Advising1796184710000 } from './1796184710000-Advising';
import { AccountSecurity1796184850000 } from './1796184850000-AccountSecurity';
import { ModelEvaluations1796184937000 } from './1796184937000-ModelEvaluations';
import { DemandOutlook1796185100000 } from './1796185100000-DemandOutlook';
import { ScoringStorage1796185200000 } from './1796185200000-ScoringStorage';
import { ImportFilePrivacy1796403727902 } from './1796403727902-ImportFilePrivacy';
import { Departments1796403900000 } from './1796403900000-Departments';
import { EstimatorSettings1796404426012 } from './1796404426012-EstimatorSettings';
import { ChoiceOutlook1796404495670 } from './1796404495670-ChoiceOutlook';
import { NoteEditsAndSentSummaries1796405000000 } from './1796405000000-NoteEditsAndSentSummaries';
import { ApiTokens1796407100000 } from './1796407100000-ApiTokens';

/** Every migration, oldest first. A new migration is added here as well as to this folder. */
export const MIGRATIONS = [
  InitialSchema1796184580000,
  Imports1796184590000,
  ModelSettings1796184700000,
  Advising1796184710000,
  AccountSecurity1796184850000,
  ModelEvaluations1796184937000,
  DemandOutlook1796185100000,
  ScoringStorage1796185200000,
  ImportFilePrivacy1796403727902,
  Departments1796403900000,
  EstimatorSettings1796404426012,
  ChoiceOutlook1796404495670,
  NoteEditsAndSentSummaries1796405000000,
  ApiTokens1796407100000,
];
