import type { ApiError } from '@kinpath/contracts';
import {
  ArgumentsHost,
  Catch,
  ExceptionFilter,
  HttpException,
  HttpStatus,
  Logger,
} from '@nestjs/common';
import type { Response } from 'express';
import { STATUS_CODES } from 'node:http';
import { INPUT_REFUSAL_MESSAGES } from './input-checks';

/**
 * Every error leaves as `{ statusCode, message, error }` (api.md); anything not
 * raised on purpose becomes a plain 500 and its details stay in the server log.
 */
@Catch()
export class HttpErrorFilter implements ExceptionFilter {
  private readonly logger = new Logger('HttpError');

  catch(exception: unknown, host: ArgumentsHost): void {
    const res = host.switchToHttp().getResponse<Response>();
    const body = toApiError(exception);
    if (body.statusCode === 503 && !(exception instanceof HttpException)) {
      this.logger.warn('A request failed: the database cannot be reached.');
    } else if (body.statusCode >= 500 && !(exception instanceof HttpException)) {
      // The message only: stacks and query parameters may hold values we must not log.
      const error = exception as { name?: string; message?: string; code?: string };
      this.logger.error(
        `Unexpected ${error?.name ?? 'error'}${error?.code ? ` (${error.code})` : ''}: ${error?.message ?? String(exception)}`,
      );
    }
    if (res.headersSent) return;
    const retryAfter = (exception as { retryAfterSeconds?: unknown })?.retryAfterSeconds;
    if (typeof retryAfter === 'number') res.setHeader('Retry-After', String(retryAfter));
    res.status(body.statusCode).json(body);
  }
}

const JSON_PARSER_MESSAGE =
  /in JSON at position \d+|^Unexpected end of JSON input$|^Unexpected token .*" is not valid JSON$/s;

export function toApiError(exception: unknown): ApiError {
  if (exception instanceof HttpException) {
    const statusCode = exception.getStatus();
    const response = exception.getResponse();
    const error = STATUS_CODES[statusCode] ?? 'Error';
    if (typeof response === 'string') return { statusCode, message: response, error };
    // Nest turns the body parser's SyntaxError into a 400 carrying V8's wording.
    if (statusCode === 400 && JSON_PARSER_MESSAGE.test(exception.message)) {
      return { statusCode, message: 'The request body is not valid JSON.', error };
    }
    const {
      message,
      error: name,
      details,
    } = response as { message?: string | string[]; error?: string; details?: unknown };
    return {
      statusCode,
      message: message ?? exception.message,
      error: typeof name === 'string' ? name : error,
      ...(details && typeof details === 'object'
        ? { details: details as Record<string, string> }
        : {}),
    };
  }
  // Errors raised by Express middleware (body parser) carry their status.
  const status = (exception as { status?: number; statusCode?: number })?.status;
  if (typeof status === 'number' && status >= 400 && status < 500) {
    const type = (exception as { type?: string }).type;
    const message =
      type === 'entity.parse.failed'
        ? 'The request body is not valid JSON.'
        : type === 'entity.too.large'
          ? 'The request body is too large.'
          : (INPUT_REFUSAL_MESSAGES[type ?? ''] ?? STATUS_CODES[status] ?? 'Bad request');
    return { statusCode: status, message, error: STATUS_CODES[status] ?? 'Error' };
  }
  if (isDatabaseUnavailable(exception)) {
    return {
      statusCode: HttpStatus.SERVICE_UNAVAILABLE,
      message: 'The database cannot be reached right now. Try again in a moment.',
      error: 'Service Unavailable',
    };
  }
  if ((exception as { code?: string })?.code === '23505') {
    return {
      statusCode: HttpStatus.CONFLICT,
      message: 'This conflicts with an existing entry.',
      error: 'Conflict',
    };
  }
  return {
    statusCode: HttpStatus.INTERNAL_SERVER_ERROR,
    message: 'Something went wrong on the server.',
    error: 'Internal Server Error',
  };
}

const CONNECTION_ERROR_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'EPIPE',
  'ETIMEDOUT',
  'EHOSTUNREACH',
]);
const CONNECTION_MESSAGES =
  /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error|Connection ended unexpectedly|the database system is (starting up|shutting down)|terminating connection/i;

/**
 * Whether an error means the database is away (refused, cut, timed out, shutting
 * down): such a request answers 503 at once rather than a 500 or a hang.
 */
export function isDatabaseUnavailable(exception: unknown): boolean {
  const error = exception as { code?: unknown; message?: unknown; driverError?: unknown } | null;
  if (!error || typeof error !== 'object') return false;
  const code = typeof error.code === 'string' ? error.code : '';
  // SQLSTATE class 08 (connection exception), 57P01-57P03 (shutdown), 53300 (too many connections).
  if (/^08|^57P0[123]$|^53300$/.test(code) || CONNECTION_ERROR_CODES.has(code)) return true;
  if (typeof error.message === 'string' && CONNECTION_MESSAGES.test(error.message)) return true;
  return error.driverError !== undefined && error.driverError !== exception
    ? isDatabaseUnavailable(error.driverError)
    : false;
}
