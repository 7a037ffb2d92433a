import { ApiProperty } from '@nestjs/swagger';
import { IsString, MaxLength, MinLength } from 'class-validator';

export class LoginDto {
  @ApiProperty({ example: 'advisor@halden.example' })
  @IsString({ message: 'Email is required.' })
  @MinLength(1, { message: 'Email is required.' })
  @MaxLength(254)
  email: string;

  @ApiProperty({ example: 'kinpath-demo-2026' })
  @IsString({ message: 'Password is required.' })
  @MinLength(1, { message: 'Password is required.' })
  @MaxLength(200)
  password: string;
}
