import type {
  CentringName,
  SimilarityMeasure,
  SimilaritySourceName,
  UpdateModelSettingsRequest,
} from '@kinpath/contracts';
import {
  CENTRINGS,
  MODEL_SETTINGS_LIMITS as LIMITS,
  SIMILARITY_MEASURES,
  SIMILARITY_SOURCES,
} from '@kinpath/contracts';
import { applyDecorators } from '@nestjs/common';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import {
  IsBoolean,
  IsIn,
  IsInt,
  IsNumber,
  IsOptional,
  IsString,
  Max,
  MaxLength,
  Min,
  ValidateBy,
  type ValidationOptions,
} from 'class-validator';

/** minNeighbours above k could never be met: every estimate would fall back to the baseline. */
function NotAboveK(options?: ValidationOptions) {
  return ValidateBy(
    {
      name: 'notAboveK',
      validator: {
        validate: (value: unknown, args) => {
          const k = (args?.object as { k?: unknown }).k;
          return typeof value !== 'number' || typeof k !== 'number' || value <= k;
        },
      },
    },
    options,
  );
}

/** Pearson correlation centres on each student's own average by definition. */
function PearsonCentring(options?: ValidationOptions) {
  return ValidateBy(
    {
      name: 'pearsonCentring',
      validator: {
        validate: (value: unknown, args) =>
          (args?.object as { similarity?: unknown }).similarity !== 'pearson' ||
          value === 'studentMean',
      },
    },
    options,
  );
}

const SOURCE_LIST = SIMILARITY_SOURCES.join(', ');

/** A baseline damping: a number from 0 to the limit. */
function DampingField(name: string, example: number) {
  const range = `${name} must be from 0 to ${LIMITS.damping.max}.`;
  return applyDecorators(
    ApiProperty({ minimum: LIMITS.damping.min, maximum: LIMITS.damping.max, example }),
    IsNumber({ allowNaN: false, allowInfinity: false }, { message: `${name} must be a number.` }),
    Min(LIMITS.damping.min, { message: range }),
    Max(LIMITS.damping.max, { message: range }),
  );
}

/** Every setting of method.md, each with its accepted range; errors say which and why. */
export class UpdateModelSettingsDto implements UpdateModelSettingsRequest {
  @ApiProperty({ enum: SIMILARITY_MEASURES, example: 'cosine' })
  @IsIn(SIMILARITY_MEASURES, { message: 'similarity must be cosine or pearson.' })
  similarity: SimilarityMeasure;

  @ApiProperty({ description: 'Inverse user frequency on or off.' })
  @IsBoolean({ message: 'iuf must be true or false.' })
  iuf: boolean;

  @ApiProperty({ enum: CENTRINGS, example: 'baseline' })
  @IsIn(CENTRINGS, { message: `centring must be one of ${CENTRINGS.join(', ')}.` })
  @PearsonCentring({ message: 'Pearson correlation needs centring studentMean.' })
  centring: CentringName;

  @ApiProperty({ enum: SIMILARITY_SOURCES, example: 'grade' })
  @IsIn(SIMILARITY_SOURCES, { message: `gradeSimilarity must be one of ${SOURCE_LIST}.` })
  gradeSimilarity: SimilaritySourceName;

  @ApiProperty({ enum: SIMILARITY_SOURCES, example: 'satisfaction+enrolment' })
  @IsIn(SIMILARITY_SOURCES, { message: `satisfactionSimilarity must be one of ${SOURCE_LIST}.` })
  satisfactionSimilarity: SimilaritySourceName;

  @DampingField('gradeDampingStudent', 1)
  gradeDampingStudent: number;

  @DampingField('gradeDampingCourse', 5)
  gradeDampingCourse: number;

  @DampingField('satisfactionDampingStudent', 5)
  satisfactionDampingStudent: number;

  @DampingField('satisfactionDampingCourse', 5)
  satisfactionDampingCourse: number;

  @ApiProperty({ minimum: LIMITS.k.min, maximum: LIMITS.k.max, example: 30 })
  @IsInt({ message: 'k must be a whole number.' })
  @Min(LIMITS.k.min, { message: `k must be at least ${LIMITS.k.min}.` })
  @Max(LIMITS.k.max, { message: `k must be at most ${LIMITS.k.max}.` })
  k: number;

  @ApiProperty({ minimum: LIMITS.minNeighbours.min, example: 5, description: 'At most k.' })
  @IsInt({ message: 'minNeighbours must be a whole number.' })
  @Min(LIMITS.minNeighbours.min, {
    message: `minNeighbours must be at least ${LIMITS.minNeighbours.min}.`,
  })
  @NotAboveK({ message: 'minNeighbours cannot be larger than k.' })
  minNeighbours: number;

  @ApiProperty({ minimum: LIMITS.minSimilarity.min, maximum: LIMITS.minSimilarity.max, example: 0 })
  @IsNumber(
    { allowNaN: false, allowInfinity: false },
    { message: 'minSimilarity must be a number.' },
  )
  @Min(LIMITS.minSimilarity.min, { message: 'minSimilarity must be between -1 and 1.' })
  @Max(LIMITS.minSimilarity.max, { message: 'minSimilarity must be between -1 and 1.' })
  minSimilarity: number;

  @ApiProperty({
    minimum: LIMITS.significance.min,
    maximum: LIMITS.significance.max,
    example: 0,
    description: 'Significance weighting threshold in shared courses; 0 turns it off.',
  })
  @IsInt({ message: 'significance must be a whole number.' })
  @Min(LIMITS.significance.min, { message: 'significance must be 0 (off) or more.' })
  @Max(LIMITS.significance.max, {
    message: `significance must be at most ${LIMITS.significance.max}.`,
  })
  significance: number;

  @ApiProperty({
    minimum: LIMITS.shrinkage.min,
    maximum: LIMITS.shrinkage.max,
    example: 25,
    description: 'Significance shrinkage beta: w * n / (n + beta); 0 turns it off.',
  })
  @IsNumber({ allowNaN: false, allowInfinity: false }, { message: 'shrinkage must be a number.' })
  @Min(LIMITS.shrinkage.min, {
    message: `shrinkage must be from 0 (off) to ${LIMITS.shrinkage.max}.`,
  })
  @Max(LIMITS.shrinkage.max, {
    message: `shrinkage must be from 0 (off) to ${LIMITS.shrinkage.max}.`,
  })
  shrinkage: number;

  @ApiProperty({
    minimum: LIMITS.tieDigits.min,
    maximum: LIMITS.tieDigits.max,
    example: 12,
    description: 'Significant digits of similarity when ranking kin; 0 ranks as computed.',
  })
  @IsInt({ message: 'tieDigits must be a whole number.' })
  @Min(LIMITS.tieDigits.min, { message: `tieDigits must be from 0 to ${LIMITS.tieDigits.max}.` })
  @Max(LIMITS.tieDigits.max, { message: `tieDigits must be from 0 to ${LIMITS.tieDigits.max}.` })
  tieDigits: number;

  @ApiProperty({ minimum: LIMITS.alpha.min, maximum: LIMITS.alpha.max, example: 0.5 })
  @IsNumber({ allowNaN: false, allowInfinity: false }, { message: 'alpha must be a number.' })
  @Min(LIMITS.alpha.min, { message: 'alpha must be between 0 and 1.' })
  @Max(LIMITS.alpha.max, { message: 'alpha must be between 0 and 1.' })
  alpha: number;

  @ApiPropertyOptional({ maxLength: LIMITS.noteMaxLength, description: 'Why the change.' })
  @IsOptional()
  @IsString({ message: 'note must be text.' })
  @MaxLength(LIMITS.noteMaxLength, {
    message: `note must be at most ${LIMITS.noteMaxLength} characters.`,
  })
  note?: string;
}
