/**
 * Local SMTP catcher for development and tests. Accepts every message on 127.0.0.1 (no auth, no
 * TLS), parses it with mailparser and keeps it as `<dir>/<id>.eml` plus `<id>.json`. A small HTTP
 * API on a second port lets tests and the dev-only /dev/mail page read what arrived:
 *   GET /health            -> 200
 *   GET /messages          -> [{ id, from, to, subject, date, text, html, headers }], oldest first
 *   GET /messages/:id.eml  -> the raw message
 *   DELETE /messages       -> forget everything
 * A recipient address containing "+smtpfail" is refused with a 451 (temporary failure) so that
 * tests can exercise the sender's retry path against a real SMTP conversation.
 * Usage: node scripts/mail-catcher.mjs --dir DIR --smtp-port N --http-port M
 */
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { parseArgs } from 'node:util';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

const { values } = parseArgs({
  options: { dir: { type: 'string' }, 'smtp-port': { type: 'string' }, 'http-port': { type: 'string' } },
});
if (!values.dir || !values['smtp-port'] || !values['http-port']) {
  console.error('usage: node scripts/mail-catcher.mjs --dir DIR --smtp-port N --http-port M');
  process.exit(3);
}
const dir = values.dir;
fs.mkdirSync(dir, { recursive: true });

async function store(raw) {
  const parsed = await simpleParser(raw);
  const id = `${Date.now().toString(36)}-${randomUUID().slice(0, 8)}`;
  const headers = {};
  for (const [key, value] of parsed.headers) headers[key] = typeof value === 'string' ? value : JSON.stringify(value);
  const record = {
    id,
    receivedAt: new Date().toISOString(),
    from: parsed.from?.text ?? '',
    to: parsed.to
      ? [parsed.to]
          .flat()
          .map((a) => a.text)
          .join(', ')
      : '',
    subject: parsed.subject ?? '',
    date: parsed.date?.toISOString() ?? null,
    text: parsed.text ?? '',
    html: typeof parsed.html === 'string' ? parsed.html : '',
    headers,
    attachments: parsed.attachments.map((a) => ({
      filename: a.filename,
      contentType: a.contentType,
      size: a.size,
      cid: a.cid,
    })),
  };
  fs.writeFileSync(path.join(dir, `${id}.eml`), raw);
  fs.writeFileSync(path.join(dir, `${id}.json`), JSON.stringify(record));
}

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS'],
  logger: false,
  onRcptTo(address, _session, callback) {
    if (address.address.includes('+smtpfail')) {
      const err = new Error('Mailbox temporarily unavailable (test catcher)');
      err.responseCode = 451;
      return callback(err);
    }
    callback();
  },
  onData(stream, _session, callback) {
    const chunks = [];
    stream.on('data', (c) => chunks.push(c));
    stream.on('end', () => {
      store(Buffer.concat(chunks)).then(
        () => callback(),
        (err) => callback(err),
      );
    });
  },
});
smtp.on('error', (err) => console.error('smtp error', err.message));

function listMessages() {
  return fs
    .readdirSync(dir)
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((f) => JSON.parse(fs.readFileSync(path.join(dir, f), 'utf8')));
}

const api = http.createServer((req, res) => {
  const url = new URL(req.url ?? '/', 'http://localhost');
  const send = (status, body, type = 'application/json') => {
    res.writeHead(status, { 'content-type': type });
    res.end(type === 'application/json' ? JSON.stringify(body) : body);
  };
  if (url.pathname === '/health') return send(200, { ok: true });
  if (url.pathname === '/messages' && req.method === 'GET') return send(200, listMessages());
  if (url.pathname === '/messages' && req.method === 'DELETE') {
    for (const f of fs.readdirSync(dir)) fs.rmSync(path.join(dir, f), { force: true });
    return send(200, { deleted: true });
  }
  const raw = /^\/messages\/([\w-]+)\.eml$/.exec(url.pathname);
  if (raw && fs.existsSync(path.join(dir, `${raw[1]}.eml`))) {
    return send(200, fs.readFileSync(path.join(dir, `${raw[1]}.eml`)), 'message/rfc822');
  }
  send(404, { error: 'not found' });
});

smtp.listen(Number(values['smtp-port']), '127.0.0.1', () => {
  api.listen(Number(values['http-port']), '127.0.0.1', () => {
    console.log(
      `mail catcher: smtp 127.0.0.1:${values['smtp-port']}, http 127.0.0.1:${values['http-port']}, folder ${dir}`,
    );
  });
});

const stop = () => {
  api.close();
  smtp.close(() => process.exit(0));
  setTimeout(() => process.exit(0), 2000).unref();
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
