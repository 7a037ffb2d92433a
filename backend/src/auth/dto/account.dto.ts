import { ApiProperty } from '@nestjs/swagger';
import { Transform } from 'class-transformer';
import { IsEmail, IsString, Matches, MaxLength } from 'class-validator';
import { TOKEN_FORM } from '../../users/account-tokens';
import { IsAcceptablePassword } from '../password-policy';

const LINK_FORM = 'The link is not complete: open it again from the e-mail.';

/** A link's token alone, to check it before a password is chosen. */
export class CheckLinkDto {
  @ApiProperty({ description: 'The token from the invitation or reset link.' })
  @IsString({ message: LINK_FORM })
  @Matches(TOKEN_FORM, { message: LINK_FORM })
  token: string;
}

export class AcceptInvitationDto {
  @ApiProperty({ description: 'The token from the invitation link.' })
  @IsString({ message: LINK_FORM })
  @Matches(TOKEN_FORM, { message: LINK_FORM })
  token: string;

  @ApiProperty({ minLength: 12, description: 'At least 12 characters, not a common password.' })
  @IsString({ message: 'Password is required.' })
  @IsAcceptablePassword()
  password: string;
}

export class ConfirmPasswordResetDto extends AcceptInvitationDto {}

export class RequestPasswordResetDto {
  @ApiProperty({ example: 'advisor@halden.example' })
  @Transform(({ value }) => (typeof value === 'string' ? value.trim().toLowerCase() : value))
  @IsEmail({}, { message: 'Email must be a valid e-mail address.' })
  @MaxLength(254)
  email: string;
}
