import { BadRequestException, ConflictException, ForbiddenException } from '@nestjs/common';
import { describe, expect, it } from 'vitest';
import { toApiError } from './http-error.filter';

describe('the error shape', () => {
  it('keeps the message of a deliberate error', () => {
    expect(
      toApiError(new ConflictException('An account for a@halden.example exists already.')),
    ).toEqual({
      statusCode: 409,
      message: 'An account for a@halden.example exists already.',
      error: 'Conflict',
    });
    expect(toApiError(new ForbiddenException())).toEqual({
      statusCode: 403,
      message: 'Forbidden',
      error: 'Forbidden',
    });
  });

  it('keeps the list of validation messages', () => {
    const error = new BadRequestException(['Password must be at least 12 characters.']);
    expect(toApiError(error).message).toEqual(['Password must be at least 12 characters.']);
  });

  it("replaces the JSON parser's wording, but not a message that merely mentions JSON", () => {
    const parser = new BadRequestException(`Unexpected token 'b', "{bad" is not valid JSON`);
    expect(toApiError(parser).message).toBe('The request body is not valid JSON.');
    const own = new BadRequestException('The mapping is not valid JSON.');
    expect(toApiError(own).message).toBe('The mapping is not valid JSON.');
  });

  it('hides the details of an unexpected error', () => {
    const body = toApiError(new Error('relation "secret" does not exist'));
    expect(body).toEqual({
      statusCode: 500,
      message: 'Something went wrong on the server.',
      error: 'Internal Server Error',
    });
  });
});

describe('database outages', () => {
  it('answer 503 for refused, cut and shut-down connections, and only those', () => {
    const refused = Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), {
      code: 'ECONNREFUSED',
    });
    const cut = new Error('Connection terminated unexpectedly');
    const shutdown = Object.assign(
      new Error('terminating connection due to administrator command'),
      {
        code: '57P01',
      },
    );
    const wrapped = { name: 'QueryFailedError', message: 'x', driverError: refused };
    for (const error of [refused, cut, shutdown, wrapped]) {
      expect(toApiError(error).statusCode).toBe(503);
    }
    expect(toApiError(Object.assign(new Error('syntax'), { code: '42601' })).statusCode).toBe(500);
  });
});
