import { DEPARTMENT_CODE_PATTERN, PASSWORD_MIN_LENGTH, ROLES, type Role } from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import {
  IsEmail,
  IsIn,
  IsOptional,
  IsString,
  Matches,
  MaxLength,
  MinLength,
} from 'class-validator';
import { IsAcceptablePassword, PASSWORD_TOO_SHORT } from '../../auth/password-policy';

const trim = ({ value }: { value: unknown }) => (typeof value === 'string' ? value.trim() : value);

export { PASSWORD_TOO_SHORT };
export const DEPARTMENT_FORM = 'Department must be a short upper-case code such as CMP.';

export class CreateUserDto {
  @ApiProperty({ example: 'advisor2@halden.example' })
  @Transform(({ value }) => (typeof value === 'string' ? value.trim().toLowerCase() : value))
  @IsEmail({}, { message: 'Email must be a valid e-mail address.' })
  @MaxLength(254)
  email: string;

  @ApiProperty({ example: 'Morgan Ashby' })
  @Transform(trim)
  @IsString()
  @MinLength(1, { message: 'Display name must not be empty.' })
  @MaxLength(120)
  displayName: string;

  @ApiProperty({ enum: ROLES })
  @IsIn(ROLES, { message: `Role must be one of ${ROLES.join(', ')}.` })
  role: Role;

  @ApiPropertyOptional({ example: 'CMP', description: 'Required for department_head.' })
  @IsOptional()
  @Transform(({ value }) => (typeof value === 'string' ? value.trim().toUpperCase() : value))
  @IsString()
  @Matches(DEPARTMENT_CODE_PATTERN, { message: DEPARTMENT_FORM })
  department?: string;

  @ApiPropertyOptional({
    minLength: PASSWORD_MIN_LENGTH,
    description:
      'With a password the account is ready at once; without one an invitation e-mail goes out. Common passwords are refused.',
  })
  @IsOptional()
  @IsString({ message: 'Password must be text.' })
  @IsAcceptablePassword()
  password?: string;
}
