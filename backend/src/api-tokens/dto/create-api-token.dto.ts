import {
  API_TOKEN_DEFAULT_DAYS,
  API_TOKEN_MAX_DAYS,
  API_TOKEN_NAME_MAX_LENGTH,
  API_TOKEN_SCOPES,
  type ApiTokenScope,
  type CreateApiTokenRequest,
} from '@kinpath/contracts';
import { ApiProperty, ApiPropertyOptional } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import {
  ArrayMinSize,
  ArrayUnique,
  IsArray,
  IsIn,
  IsOptional,
  IsString,
  IsUUID,
  Matches,
  MaxLength,
  MinLength,
} from 'class-validator';

export class CreateApiTokenDto implements CreateApiTokenRequest {
  @ApiProperty({ example: 'Student information system, nightly' })
  @Transform(({ value }) => (typeof value === 'string' ? value.trim() : value))
  @IsString({ message: 'Name must be text.' })
  @MinLength(1, { message: 'Name must not be empty.' })
  @MaxLength(API_TOKEN_NAME_MAX_LENGTH, {
    message: `Name must be at most ${API_TOKEN_NAME_MAX_LENGTH} characters.`,
  })
  name: string;

  @ApiProperty({ enum: API_TOKEN_SCOPES, isArray: true })
  @IsArray({ message: 'Scopes must be a list.' })
  @ArrayMinSize(1, { message: 'Choose at least one scope.' })
  @ArrayUnique({ message: 'Each scope may appear once.' })
  @IsIn(API_TOKEN_SCOPES, {
    each: true,
    message: `Each scope must be one of ${API_TOKEN_SCOPES.join(', ')}.`,
  })
  scopes: ApiTokenScope[];

  @ApiProperty({
    example: '2027-03-01',
    description: `Last day the token works (UTC), at most ${API_TOKEN_MAX_DAYS} days ahead; the screen suggests ${API_TOKEN_DEFAULT_DAYS}.`,
  })
  @IsString()
  @Matches(/^\d{4}-\d{2}-\d{2}$/, { message: 'Expiry must be a date such as 2027-03-01.' })
  expiresOn: string;

  @ApiPropertyOptional({ description: 'Admins only: whose role the token acts with.' })
  @IsOptional()
  @IsUUID('all', { message: 'Owner must be an account id.' })
  ownerId?: string;
}
