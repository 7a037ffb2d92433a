import 'reflect-metadata';
import { ConsoleLogger, Logger, ValidationPipe } from '@nestjs/common';
import { NestFactory } from '@nestjs/core';
import type { NestExpressApplication } from '@nestjs/platform-express';
import helmet from 'helmet';
import { createServer } from 'node:net';
import { AppModule } from './app.module';
import { rejectBadText, verifyJsonDepth } from './common/input-checks';
import { ConfigError, loadConfig, logLevelsFrom, type AppConfig } from './config/config';
import { SetupService } from './setup/setup.service';
import { setUpOpenApi } from './web/openapi';
import { serveSpa } from './web/spa';

async function bootstrap(): Promise<void> {
  let config: AppConfig;
  try {
    config = loadConfig();
  } catch (error) {
    if (error instanceof ConfigError) {
      process.stderr.write(`Kinpath cannot start: ${error.message}\n`);
      process.exit(1);
    }
    throw error;
  }

  // Checked before anything else starts, so a taken port is one sentence, not a stack trace.
  const taken = await new Promise<unknown>((done) => {
    const probe = createServer();
    probe.once('error', done);
    probe.listen(config.port, config.host, () => probe.close(() => done(null)));
  });
  const problem = taken ? portProblem(taken, config) : null;
  if (problem) {
    process.stderr.write(`Kinpath cannot start: ${problem.message}\n`);
    process.exit(1);
  }

  const app = await NestFactory.create<NestExpressApplication>(AppModule, {
    // One JSON object per line; messages never carry passwords, tokens or student numbers.
    logger: new ConsoleLogger({
      json: config.logFormat === 'json',
      colors: config.logFormat === 'text' && process.stdout.isTTY,
      logLevels: logLevelsFrom(config.logLevel),
    }),
    bodyParser: true,
    // Closed unless KINPATH_CORS_ORIGINS names the sites that may call the API.
    cors: config.corsOrigins.length > 0 ? { origin: config.corsOrigins } : false,
  });
  app.enableShutdownHooks();
  app.disable('x-powered-by');
  // API answers are no-store, so no client ever revalidates them; an ETag would cost a
  // SHA-1 of every answer (about 1 ms for a 3,000-elective list).
  app.set('etag', false);
  // X-Forwarded-For decides the client address every per-address limit counts; only the
  // proxies named in KINPATH_TRUSTED_PROXIES may set it.
  app.set('trust proxy', config.trustedProxies.length > 0 ? config.trustedProxies : false);
  // The depth check runs on the raw bytes: JSON.parse would overflow the stack first.
  app.useBodyParser('json', { limit: '1mb', verify: verifyJsonDepth });
  app.useBodyParser('urlencoded', { limit: '64kb', extended: false });
  app.use('/api', rejectBadText);
  // API answers hold personal data: no browser or proxy may keep them.
  app.use(
    '/api',
    (_req: unknown, res: { setHeader(n: string, v: string): void }, next: () => void) => {
      res.setHeader('Cache-Control', 'no-store');
      next();
    },
  );
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // Emotion (MUI) writes style elements at run time.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:'],
          fontSrc: ["'self'"],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
        },
      },
    }),
  );
  app.setGlobalPrefix('api');
  app.useGlobalPipes(
    new ValidationPipe({ whitelist: true, forbidNonWhitelisted: true, transform: true }),
  );
  setUpOpenApi(app);
  serveSpa(app, config.staticDir);

  try {
    await app.listen(config.port, config.host);
  } catch (error) {
    await app.close().catch(() => undefined);
    throw portProblem(error, config) ?? error;
  }
  announce(config, app.get(SetupService));
}

/** A port that is taken or not allowed, as one sentence naming the setting to change. */
function portProblem(error: unknown, config: AppConfig): ConfigError | null {
  const code = (error as { code?: string })?.code;
  if (code === 'EADDRINUSE') {
    return new ConfigError(
      `port ${config.port} on ${config.host} is in use by another program; set PORT to a free port.`,
    );
  }
  if (code === 'EACCES') {
    return new ConfigError(
      `port ${config.port} on ${config.host} cannot be used by this user; set PORT to a port above 1023.`,
    );
  }
  return null;
}

function announce(config: AppConfig, setup: SetupService): void {
  const logger = new Logger('Kinpath');
  const address = `http://${config.host.includes(':') ? `[${config.host}]` : config.host}:${config.port}`;
  logger.log(`Kinpath is ready at ${address} (API documentation at ${address}/api/docs).`);
  const demo = setup.outcome.demo;
  if (demo) {
    const lines = demo.accounts.map(
      (a) => `  ${a.email.padEnd(28)} ${a.role}${a.department ? ` (${a.department})` : ''}`,
    );
    logger.log(
      `Demo sign-ins, all with the password ${demo.password} (change them before real use):\n${lines.join('\n')}`,
    );
  }
}

bootstrap().catch((error: unknown) => {
  const message =
    error instanceof ConfigError
      ? error.message
      : error instanceof Error
        ? `${error.name}: ${error.message}`
        : String(error);
  process.stderr.write(`Kinpath cannot start: ${message}\n`);
  process.exit(1);
});
