import type {
  ImportAccepted,
  ImportPreview,
  ImportRejection,
  ImportSummary,
  SavedImportMapping,
} from '@kinpath/contracts';
import {
  Body,
  Controller,
  Get,
  Headers,
  HttpCode,
  Param,
  ParseUUIDPipe,
  Post,
  Res,
  UploadedFile,
  UseInterceptors,
} from '@nestjs/common';
import { ApiConsumes, ApiOperation, ApiProduces, ApiTags } from '@nestjs/swagger';
import type { Response } from 'express';
import { CurrentUser, Roles, Scopes, SignedIn } from '../auth/decorators';
import type { User } from '../users/entities/user.entity';
import { CheckAgainDto, CreateImportDto, PreviewImportDto } from './dto/create-import.dto';
import { SaveMappingDto } from './dto/save-mapping.dto';
import { ImportsService, type UploadedFile as ImportFile } from './imports.service';
import { UploadInterceptor } from './upload.interceptor';

@ApiTags('imports')
@SignedIn()
@Roles('registrar')
@Controller('imports')
export class ImportsController {
  constructor(private readonly imports: ImportsService) {}

  @Post()
  @Scopes('imports:write')
  @HttpCode(202)
  @ApiConsumes('multipart/form-data')
  @ApiOperation({
    summary: 'Upload a file of one kind; it is validated, and committed on request.',
  })
  @UseInterceptors(UploadInterceptor)
  upload(
    @UploadedFile() file: ImportFile | undefined,
    @Body() body: CreateImportDto,
    @CurrentUser() user: User,
  ): Promise<ImportAccepted> {
    return this.imports.upload(
      file,
      body.kind,
      body.mapping,
      body.commit === 'true',
      user,
      body.encoding,
    );
  }

  @Post('preview')
  @Scopes('imports:write')
  @HttpCode(200)
  @ApiConsumes('multipart/form-data')
  @ApiOperation({ summary: 'Headers, first rows and suggested mappings of a file, for mapping.' })
  @UseInterceptors(UploadInterceptor)
  preview(
    @UploadedFile() file: ImportFile | undefined,
    @Body() body: PreviewImportDto,
  ): Promise<ImportPreview> {
    return this.imports.preview(file, body.encoding);
  }

  @Get('mappings')
  @Scopes('imports:read')
  mappings(): Promise<SavedImportMapping[]> {
    return this.imports.mappings();
  }

  @Post('mappings')
  @Scopes('imports:write')
  saveMapping(
    @Body() body: SaveMappingDto,
    @CurrentUser() user: User,
  ): Promise<SavedImportMapping> {
    return this.imports.saveMapping(body.name, body.kind, body.mapping, user);
  }

  @Get()
  @Scopes('imports:read')
  list(): Promise<ImportSummary[]> {
    return this.imports.list();
  }

  @Get(':id')
  @Scopes('imports:read')
  get(@Param('id', ParseUUIDPipe) id: string): Promise<ImportSummary> {
    return this.imports.get(id);
  }

  @Get(':id/errors')
  @Scopes('imports:read')
  @ApiProduces('application/json', 'text/csv')
  @ApiOperation({ summary: 'Rejected cells: JSON, or CSV with `Accept: text/csv`.' })
  async errors(
    @Param('id', ParseUUIDPipe) id: string,
    @Headers('accept') accept: string | undefined,
    @Res({ passthrough: true }) res: Response,
  ): Promise<ImportRejection[] | string> {
    if (accept?.includes('text/csv')) {
      const csv = await this.imports.rejectionsCsv(id);
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="import-${id}-rejections.csv"`);
      return csv;
    }
    return this.imports.rejections(id);
  }

  @Get(':id/preview')
  @Scopes('imports:read')
  @ApiOperation({
    summary: 'Headers and first rows of a validated import’s kept file, to map it again.',
  })
  keptPreview(@Param('id', ParseUUIDPipe) id: string): Promise<ImportPreview> {
    return this.imports.keptPreview(id);
  }

  @Get(':id/rejected-rows')
  @Scopes('imports:read')
  @ApiProduces('text/csv')
  @ApiOperation({
    summary:
      'The rejected rows in the file’s own columns plus a reason, while the import is validated and not committed.',
  })
  async rejectedRows(
    @Param('id', ParseUUIDPipe) id: string,
    @Res({ passthrough: true }) res: Response,
  ): Promise<string> {
    const csv = await this.imports.rejectedRowsCsv(id);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Cache-Control', 'no-store');
    res.setHeader('Content-Disposition', `attachment; filename="import-${id}-rejected-rows.csv"`);
    return csv;
  }

  @Post(':id/discard')
  @Scopes('imports:write')
  @HttpCode(200)
  @ApiOperation({
    summary: 'Discard a validated import that is not wanted; its files are removed.',
  })
  discard(
    @Param('id', ParseUUIDPipe) id: string,
    @CurrentUser() user: User,
  ): Promise<ImportSummary> {
    return this.imports.discard(id, user);
  }

  @Post(':id/check-again')
  @Scopes('imports:write')
  @HttpCode(202)
  @ApiOperation({
    summary: 'Check the kept file of a validated import again with another mapping.',
  })
  checkAgain(
    @Param('id', ParseUUIDPipe) id: string,
    @Body() body: CheckAgainDto,
    @CurrentUser() user: User,
  ): Promise<ImportAccepted> {
    return this.imports.checkAgain(id, body.mapping, user);
  }

  @Post(':id/commit')
  @Scopes('imports:write')
  @HttpCode(202)
  @ApiOperation({ summary: 'Commit the accepted rows of a validated import.' })
  commit(
    @Param('id', ParseUUIDPipe) id: string,
    @CurrentUser() user: User,
  ): Promise<ImportSummary> {
    return this.imports.requestCommit(id, user);
  }

  @Post(':id/rollback')
  @Scopes('imports:write')
  @HttpCode(200)
  @ApiOperation({ summary: 'Restore the term data as it was before this import.' })
  rollback(
    @Param('id', ParseUUIDPipe) id: string,
    @CurrentUser() user: User,
  ): Promise<ImportSummary> {
    return this.imports.rollback(id, user);
  }
}
