import type { CreateEvaluationRequest, EvaluationConfiguration } from '@kinpath/contracts';
import {
  EVALUATION_NAME_MAX_LENGTH,
  MAX_EVALUATION_CONFIGURATIONS,
  TERM_PATTERN,
} from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional, OmitType } from '@nestjs/swagger';
import { Type } from 'class-transformer';
import {
  ArrayMaxSize,
  ArrayMinSize,
  IsArray,
  IsOptional,
  IsString,
  Matches,
  MaxLength,
  ValidateNested,
} from 'class-validator';
import { UpdateModelSettingsDto } from '../../model/dto/update-model-settings.dto';

/** One configuration: validated exactly as `PUT /api/model/settings`, with a name instead of a note. */
export class EvaluationConfigurationDto
  extends OmitType(UpdateModelSettingsDto, ['note'] as const)
  implements EvaluationConfiguration
{
  @ApiPropertyOptional({
    maxLength: EVALUATION_NAME_MAX_LENGTH,
    description: 'Shown in the results; "Configuration 1", "Configuration 2"… when absent.',
  })
  @IsOptional()
  @IsString({ message: 'name must be text.' })
  @MaxLength(EVALUATION_NAME_MAX_LENGTH, {
    message: `name must be at most ${EVALUATION_NAME_MAX_LENGTH} characters.`,
  })
  name?: string;
}

export class CreateEvaluationDto implements CreateEvaluationRequest {
  @ApiPropertyOptional({
    example: '2024-FA',
    description: 'The term to hold out; the last completed term when absent.',
  })
  @IsOptional()
  @IsString({ message: 'holdoutTerm must be text.' })
  @Matches(TERM_PATTERN, { message: 'holdoutTerm must be a term such as 2024-FA.' })
  holdoutTerm?: string;

  @ApiProperty({
    type: [EvaluationConfigurationDto],
    minItems: 1,
    maxItems: MAX_EVALUATION_CONFIGURATIONS,
  })
  @IsArray({ message: 'configurations must be a list of model settings.' })
  @ArrayMinSize(1, { message: 'configurations must hold at least one configuration.' })
  @ArrayMaxSize(MAX_EVALUATION_CONFIGURATIONS, {
    message: `configurations may hold at most ${MAX_EVALUATION_CONFIGURATIONS} configurations.`,
  })
  @ValidateNested({ each: true })
  @Type(() => EvaluationConfigurationDto)
  configurations: EvaluationConfigurationDto[];
}
