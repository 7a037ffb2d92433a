#!/usr/bin/env node
// A local SMTP catcher: Kinpath's e-mails stop here and are kept as files, so
// no message leaves the machine. `npm start` and `npm test` run it themselves.
//
//   node tools/mail-catcher.mjs serve [--profile start|test]   run it on its own
//   node tools/mail-catcher.mjs list  [--profile start|test]   print the caught messages
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import { profileDir } from './lib/paths.mjs';

// Each profile's ports, and the variables that move them (two instances on one machine).
export const MAIL_PORT_VARIABLES = {
  start: { smtpPort: 'KINPATH_SMTP_PORT', httpPort: 'KINPATH_MAIL_HTTP_PORT' },
  test: { smtpPort: 'KINPATH_TEST_SMTP_PORT', httpPort: 'KINPATH_TEST_MAIL_HTTP_PORT' },
};
const fallbackPorts = {
  start: { smtpPort: 2525, httpPort: 2580 },
  test: { smtpPort: 2535, httpPort: 2590 },
};
export const MAIL_DEFAULTS = Object.fromEntries(
  Object.entries(fallbackPorts).map(([profile, ports]) => [
    profile,
    {
      smtpPort: Number(process.env[MAIL_PORT_VARIABLES[profile].smtpPort] ?? ports.smtpPort),
      httpPort: Number(process.env[MAIL_PORT_VARIABLES[profile].httpPort] ?? ports.httpPort),
      variables: MAIL_PORT_VARIABLES[profile],
    },
  ]),
);

/** Listens on loopback; a port in use becomes one sentence naming the variable that moves it. */
function listenOn(server, port, variable) {
  return new Promise((resolve, reject) => {
    server.once('error', (error) => {
      if (error && error.code === 'EADDRINUSE') {
        const message = `kinpath: port ${port} on 127.0.0.1 is in use; set ${variable ?? 'another port'} to a free port.`;
        reject(Object.assign(new Error(message), { code: 'EADDRINUSE', friendly: true }));
      } else reject(error);
    });
    server.listen(port, '127.0.0.1', resolve);
  });
}

export function mailDir(profile) {
  return join(profileDir(profile), 'mail');
}

/** Reads the caught messages, oldest first. */
export function readMessages(dir) {
  let files = [];
  try {
    files = readdirSync(dir)
      .filter((f) => f.endsWith('.json'))
      .sort();
  } catch {
    return [];
  }
  return files.map((f) => JSON.parse(readFileSync(join(dir, f), 'utf8')));
}

/** Starts the SMTP listener and a small read-only web page of the messages on loopback. */
export async function startMailCatcher({ smtpPort, httpPort, dir, variables = {} }) {
  mkdirSync(dir, { recursive: true });
  let sequence = 0;
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          sequence += 1;
          const id = `${Date.now()}-${String(sequence).padStart(4, '0')}`;
          const message = {
            id,
            receivedAt: new Date().toISOString(),
            from: mail.from?.text ?? '',
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : '',
          };
          writeFileSync(join(dir, `${id}.json`), JSON.stringify(message, null, 2));
          callback();
        })
        .catch(callback);
    },
  });
  await listenOn(smtp, smtpPort, variables.smtpPort);
  const http = createServer((req, res) => {
    const messages = readMessages(dir);
    if (req.url?.startsWith('/messages.json')) {
      res.writeHead(200, { 'content-type': 'application/json' });
      res.end(JSON.stringify(messages));
      return;
    }
    const escape = (s) => String(s).replace(/[&<>"]/g, (c) => `&#${c.charCodeAt(0)};`);
    const rows = messages
      .reverse()
      .map(
        (m) =>
          `<article><h2>${escape(m.subject)}</h2><p>To ${escape(m.to.join(', '))} · ${escape(m.receivedAt)}</p><pre>${escape(m.text)}</pre></article>`,
      )
      .join('\n');
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    res.end(
      `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Kinpath caught mail</title></head><body><main><h1>Caught mail (${messages.length})</h1>${rows || '<p>No messages yet.</p>'}</main></body></html>`,
    );
  });
  try {
    await listenOn(http, httpPort, variables.httpPort);
  } catch (error) {
    await new Promise((r) => smtp.close(r));
    throw error;
  }
  return {
    url: `http://127.0.0.1:${httpPort}`,
    close: () =>
      Promise.all([new Promise((r) => smtp.close(r)), new Promise((r) => http.close(r))]),
  };
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const [command = 'list', ...rest] = process.argv.slice(2);
  const i = rest.indexOf('--profile');
  const profile = i >= 0 ? rest[i + 1] : 'start';
  const dir = mailDir(profile);
  if (command === 'list') {
    const messages = readMessages(dir);
    if (messages.length === 0) console.log(`No caught messages in ${dir}.`);
    for (const m of messages) {
      console.log(
        `--- ${m.receivedAt}  to ${m.to.join(', ')}\nSubject: ${m.subject}\n\n${m.text}\n`,
      );
    }
  } else if (command === 'serve') {
    const catcher = await startMailCatcher({ ...MAIL_DEFAULTS[profile], dir });
    console.log(
      `kinpath: catching mail on 127.0.0.1:${MAIL_DEFAULTS[profile].smtpPort}; read it at ${catcher.url}`,
    );
  } else {
    console.error(`kinpath: unknown command "${command}" (list or serve).`);
    process.exit(2);
  }
}
