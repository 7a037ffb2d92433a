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
import { createWriteStream } from 'node:fs';
import { join } from 'node:path';
import { pipeline } from 'node:stream/promises';
import { finalize, Observable } from 'rxjs';
import type { AppConfig } from '../config/config';
import { InjectConfig } from '../config/config.provider';
import { removeQuietly, uploadLimitMb, uploadsDir } from './import-files';

/** Multer's disk storage, but the file is created readable by the server only (0600). */
function privateDiskStorage(dir: string): multer.StorageEngine {
  return {
    _handleFile(_req, file, done) {
      const path = join(dir, `${randomUUID()}.incoming`);
      const out = createWriteStream(path, { mode: 0o600, flags: 'wx' });
      let size = 0;
      file.stream.on('data', (chunk: Buffer) => (size += chunk.length));
      pipeline(file.stream, out).then(
        () => done(null, { path, size }),
        (error: Error) => {
          void removeQuietly(path);
          done(error);
        },
      );
    },
    _removeFile(_req, file, done) {
      removeQuietly(file.path).then(() => done(null), done);
    },
  };
}

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
      storage: privateDiskStorage(dir),
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
