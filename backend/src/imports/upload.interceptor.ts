import {
  BadRequestException,
  CallHandler,
  ExecutionContext,
  Injectable,
  NestInterceptor,
  PayloadTooLargeException,
} from '@nestjs/common';
import type { Request, Response } from 'express';
import multer from 'multer';
import { randomUUID } from 'node:crypto';
import { finalize, Observable } from 'rxjs';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { removeQuietly, uploadLimitMb, uploadsDir } from './import-files';

/**
 * Streams the multipart `file` field to disk under the data folder, never whole
 * into memory, and answers 413 with the limit when a file is larger.
 */
@Injectable()
export class UploadInterceptor implements NestInterceptor {
  private readonly limitMb = uploadLimitMb();
  private readonly upload: ReturnType<ReturnType<typeof multer>['single']>;

  constructor(@InjectConfig() config: AppConfig) {
    const dir = uploadsDir(config.dataDir);
    this.upload = multer({
      storage: multer.diskStorage({
        destination: dir,
        filename: (_req, _file, done) => done(null, `${randomUUID()}.incoming`),
      }),
      limits: { fileSize: Math.floor(this.limitMb * 1024 * 1024), files: 1, fields: 20 },
    }).single('file');
  }

  async intercept(context: ExecutionContext, next: CallHandler): Promise<Observable<unknown>> {
    const http = context.switchToHttp();
    const req = http.getRequest<Request>();
    const res = http.getResponse<Response>();
    await new Promise<void>((resolve, reject) => {
      this.upload(req, res, (error: unknown) => {
        if (!error) return resolve();
        const code = (error as { code?: string }).code;
        if (code === 'LIMIT_FILE_SIZE') {
          return reject(
            new PayloadTooLargeException(
              `The file is larger than the upload limit of ${this.limitMb} MB (KINPATH_UPLOAD_LIMIT_MB).`,
            ),
          );
        }
        if (code === 'LIMIT_UNEXPECTED_FILE') {
          return reject(
            new BadRequestException('Send one CSV file in the multipart field `file`.'),
          );
        }
        reject(
          new BadRequestException(`The upload could not be read: ${(error as Error).message}`),
        );
      });
    });
    // Whatever the handler does (or when the body fails validation), the incoming
    // file, which may hold raw student numbers, does not outlive the request.
    const path = (req as Request & { file?: { path?: string } }).file?.path;
    return next.handle().pipe(finalize(() => void removeQuietly(path)));
  }
}
