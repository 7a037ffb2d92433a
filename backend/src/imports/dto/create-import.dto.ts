import { IMPORT_ENCODINGS, IMPORT_KINDS, type ImportKind } from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import { IsIn, IsOptional, IsString, MaxLength } from 'class-validator';

/** The text fields of `POST /api/imports` (multipart); the file comes as `file`. */
export class CreateImportDto {
  @ApiProperty({ enum: IMPORT_KINDS })
  @IsIn(IMPORT_KINDS)
  kind: ImportKind;

  @ApiPropertyOptional({
    description:
      'JSON object: the file header to the field it holds, e.g. {"Student No":"student_id"}',
  })
  @IsOptional()
  @IsString()
  @MaxLength(20_000)
  mapping?: string;

  @ApiPropertyOptional({ enum: ['true', 'false'], description: 'Commit when no row is rejected.' })
  @IsOptional()
  @IsIn(['true', 'false'])
  commit?: string;

  @ApiPropertyOptional({
    enum: IMPORT_ENCODINGS,
    description: 'The encoding the registrar confirmed for a file that is not UTF-8.',
  })
  @IsOptional()
  @IsIn(IMPORT_ENCODINGS)
  encoding?: string;
}

/** The text fields of `POST /api/imports/preview` (multipart). */
export class PreviewImportDto {
  @ApiPropertyOptional({ enum: IMPORT_ENCODINGS })
  @IsOptional()
  @IsIn(IMPORT_ENCODINGS)
  encoding?: string;
}

/** `POST /api/imports/:id/check-again`: the new mapping. */
export class CheckAgainDto {
  @ApiPropertyOptional({ description: 'JSON object: the file header to the field it holds.' })
  @IsOptional()
  @IsString()
  @MaxLength(20_000)
  mapping?: string;
}
