import type { INestApplication } from '@nestjs/common';
import { DocumentBuilder, type OpenAPIObject, SwaggerModule } from '@nestjs/swagger';
import { OPENAPI_PUBLIC, OPENAPI_ROLES } from '../auth/decorators';

const METHODS = ['get', 'put', 'post', 'delete', 'patch', 'options', 'head'] as const;

/**
 * The OpenAPI document at /api/docs-json and its UI at /api/docs. Each operation
 * states who may call it, in its description and as `x-kinpath-roles`.
 */
export function setUpOpenApi(app: INestApplication): OpenAPIObject {
  const config = new DocumentBuilder()
    .setTitle('Kinpath API')
    .setDescription(
      "Elective advising, term data imports and demand outlook for the registrar's office. Sign in with POST /api/auth/login and send the token as `Authorization: Bearer <token>`.",
    )
    .setVersion('1')
    .addBearerAuth()
    .build();
  const document = SwaggerModule.createDocument(app, config);
  describeAccess(document);
  SwaggerModule.setup('api/docs', app, document, {
    jsonDocumentUrl: 'api/docs-json',
    yamlDocumentUrl: 'api/docs-yaml',
    customSiteTitle: 'Kinpath API',
  });
  return document;
}

function describeAccess(document: OpenAPIObject): void {
  for (const item of Object.values(document.paths)) {
    for (const method of METHODS) {
      const operation = item[method] as
        (Record<string, unknown> & { description?: string; security?: unknown[] }) | undefined;
      if (!operation) continue;
      const roles = operation[OPENAPI_ROLES] as string[] | undefined;
      let access: string;
      if (operation[OPENAPI_PUBLIC]) {
        access = 'Access: anyone, no sign-in needed.';
        operation.security = [];
      } else {
        access = roles ? `Access: ${roles.join(', ')}.` : 'Access: any signed-in user.';
        operation.security = [{ bearer: [] }];
      }
      operation.description = operation.description
        ? `${operation.description}\n\n${access}`
        : access;
    }
  }
}
