import { ApiProperty } from '@nestjs/swagger';
import { Type } from 'class-transformer';
import {
  ArrayMaxSize,
  ArrayMinSize,
  IsBoolean,
  IsNumber,
  IsString,
  Matches,
  Max,
  Min,
  ValidateNested,
} from 'class-validator';

const LETTER = /^[A-Za-z][A-Za-z+-]{0,3}$/;

export class GradeLetterDto {
  @ApiProperty({ example: 'A-' })
  @IsString()
  @Matches(LETTER, { message: 'a letter is 1 to 4 characters: letters, + or -' })
  letter: string;

  @ApiProperty({ example: 3.7 })
  @IsNumber({ maxDecimalPlaces: 2 })
  @Min(0)
  @Max(999)
  points: number;
}

export class GradeMarkDto {
  @ApiProperty({ example: 'P' })
  @IsString()
  @Matches(LETTER, { message: 'a mark is 1 to 4 characters: letters, + or -' })
  letter: string;

  @ApiProperty()
  @IsBoolean()
  passing: boolean;
}

export class UpdateGradeScaleDto {
  @ApiProperty({ type: [GradeLetterDto], description: 'Any order: stored best first, by points.' })
  @ValidateNested({ each: true })
  @Type(() => GradeLetterDto)
  @ArrayMinSize(2)
  @ArrayMaxSize(200)
  letters: GradeLetterDto[];

  @ApiProperty({ type: [GradeMarkDto] })
  @ValidateNested({ each: true })
  @Type(() => GradeMarkDto)
  @ArrayMaxSize(50)
  marks: GradeMarkDto[];

  @ApiProperty({ example: 'D-', description: 'The lowest passing letter.' })
  @IsString()
  passingThreshold: string;
}
