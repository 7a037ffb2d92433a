import type { CreateNoteRequest } from '@kinpath/contracts';
import { NOTE_MAX_LENGTH } from '@kinpath/contracts';
import { ApiProperty } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import { IsString, Length } from 'class-validator';

export class CreateNoteDto implements CreateNoteRequest {
  @ApiProperty({ minLength: 1, maxLength: NOTE_MAX_LENGTH })
  @Transform(({ value }) => (typeof value === 'string' ? value.trim() : value))
  @IsString({ message: 'text must be text.' })
  @Length(1, NOTE_MAX_LENGTH, {
    message: `text must be 1 to ${NOTE_MAX_LENGTH} characters (blanks at either end do not count).`,
  })
  text: string;
}
