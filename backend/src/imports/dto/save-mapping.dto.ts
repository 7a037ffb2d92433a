import { IMPORT_KINDS, type ImportKind, type ImportMapping } from '@kinpath/contracts';
import { ApiProperty } from '@nestjs/swagger';
import { IsIn, IsNotEmpty, IsObject, IsString, MaxLength } from 'class-validator';

export class SaveMappingDto {
  @ApiProperty({ example: 'SIS export, autumn' })
  @IsString()
  @IsNotEmpty()
  @MaxLength(100)
  name: string;

  @ApiProperty({ enum: IMPORT_KINDS })
  @IsIn(IMPORT_KINDS)
  kind: ImportKind;

  @ApiProperty({ type: 'object', additionalProperties: { type: 'string' } })
  @IsObject()
  mapping: ImportMapping;
}
