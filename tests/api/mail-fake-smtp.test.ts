/**
 * The local SMTP fake (server/mail/fake-smtp.ts) on a real PostgreSQL: a real nodemailer send
 * lands in mail_messages parsed; loopback only. And the message reader it uses
 * (server/mail/parse.ts) against the published examples of the RFCs it implements.
 *
 * Sources: RFC 2047 §8 (encoded-word examples), RFC 2045 §6.7 (quoted-printable: "=XX" octets,
 * soft line break "=" at the end of a line), RFC 5322 §2.2.3 (folding) and §3.4 (address lists),
 * RFC 2046 §5.1.1 (multipart boundaries).
 */
import nodemailer from 'nodemailer';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { addresses, decodeEncodedWords, decodeQuotedPrintable, parseMessage } from '../../server/mail/parse';
import { createTestDatabase, type TestDb } from './helpers/db';

let db: TestDb;
let fake: FakeSmtp;
beforeAll(async () => {
  db = await createTestDatabase({ seed: false });
  fake = await startFakeSmtp({ host: '127.0.0.1', port: 0, dataSource: db.dataSource });
});
afterAll(async () => {
  await fake?.stop();
  await db?.drop();
});

interface Row {
  from_address: string;
  to_addresses: string[];
  subject: string;
  text: string;
  raw_size: number;
}
const rows = async () => (await db.dataSource.query(`SELECT * FROM "mail_messages" ORDER BY "received_at"`)) as Row[];

test('a real nodemailer send to the fake on port 0 lands in mail_messages with from, to, subject and text', async () => {
  expect(fake.port).toBeGreaterThan(0);
  expect(fake.url).toBe(`smtp://127.0.0.1:${fake.port}`);
  const transport = nodemailer.createTransport(fake.url);
  const longLine = `TI-301 reads 1.6 K above what the deaerator balance allows (147.9 °C ± 0.5 K). ${'x'.repeat(120)}`;
  const text = `Hello Morgan,\n\nWork order: WO-0007\n${longLine}\nCaution — hot surfaces.\n=3D is not an escape here.`;
  const info = await transport.sendMail({
    from: 'Trueround <trueround@localhost>',
    to: 'Morgan Tilly <Planner@Fernhallow.example>, "Vale, Jordan" <admin@fernhallow.example>',
    cc: 'engineer@fernhallow.example',
    subject: '[Trueround] Priority 1 work order WO-0007 opened: Calibrate TI-301 — 1.6 K high at 147.9 °C',
    text,
    textEncoding: 'quoted-printable',
  });
  transport.close();
  expect(info.accepted).toHaveLength(3);
  const stored = await rows();
  expect(stored).toHaveLength(1);
  const m = stored[0];
  expect(m.from_address).toBe('trueround@localhost');
  expect(m.to_addresses).toEqual([
    'planner@fernhallow.example',
    'admin@fernhallow.example',
    'engineer@fernhallow.example',
  ]);
  expect(m.subject).toBe('[Trueround] Priority 1 work order WO-0007 opened: Calibrate TI-301 — 1.6 K high at 147.9 °C');
  expect(m.text).toBe(text);
  expect(m.raw_size).toBeGreaterThan(text.length);
  expect(fake.received()).toBe(1);
});

test('base64, raw 8bit and multipart messages: the plain text is found and decoded', async () => {
  const transport = nodemailer.createTransport(fake.url);
  await transport.sendMail({
    from: 'a@example.test',
    to: 'b@example.test',
    subject: 'base64',
    text: 'Überdruck 3 bar\n',
    textEncoding: 'base64',
  });
  await transport.sendMail({
    envelope: { from: 'a@example.test', to: ['d@example.test'] },
    raw: 'From: a@example.test\r\nSubject: raw 8bit\r\nContent-Type: text/plain; charset=utf-8\r\nContent-Transfer-Encoding: 8bit\r\n\r\nDruck 3 bar(ü)\r\n',
  });
  await transport.sendMail({
    from: 'a@example.test',
    to: 'c@example.test',
    subject: 'with html',
    text: 'the plain part',
    html: '<p>the html part</p>',
  });
  transport.close();
  const stored = await rows();
  expect(stored.slice(1).map((r) => [r.subject, r.to_addresses, r.text])).toEqual([
    ['base64', ['b@example.test'], 'Überdruck 3 bar'],
    // no To header: the envelope's recipients
    ['raw 8bit', ['d@example.test'], 'Druck 3 bar(ü)'],
    ['with html', ['c@example.test'], 'the plain part'],
  ]);
});

test('the fake refuses to bind anything but loopback', async () => {
  await expect(startFakeSmtp({ host: '0.0.0.0', port: 0, dataSource: db.dataSource })).rejects.toThrow(
    /loopback.*got "0\.0\.0\.0"/,
  );
  await expect(startFakeSmtp({ host: '192.168.1.10', port: 0, dataSource: db.dataSource })).rejects.toThrow(/loopback/);
  await expect(startFakeSmtp({ host: '127.0.0.1', port: 70000, dataSource: db.dataSource })).rejects.toThrow(
    /port must be .* got 70000/,
  );
});

describe('message reader', () => {
  test('RFC 2047 §8 encoded-word examples decode as the RFC shows', () => {
    expect(decodeEncodedWords('=?US-ASCII?Q?Keith_Moore?= <moore@cs.utk.edu>')).toBe('Keith Moore <moore@cs.utk.edu>');
    expect(decodeEncodedWords('=?ISO-8859-1?Q?Keld_J=F8rn_Simonsen?= <keld@dkuug.dk>')).toBe(
      'Keld Jørn Simonsen <keld@dkuug.dk>',
    );
    expect(decodeEncodedWords('=?ISO-8859-1?Q?Andr=E9?= Pirard <PIRARD@vm1.ulg.ac.be>')).toBe(
      'André Pirard <PIRARD@vm1.ulg.ac.be>',
    );
    expect(
      decodeEncodedWords(
        '=?ISO-8859-1?B?SWYgeW91IGNhbiByZWFkIHRoaXMgeW8=?= =?ISO-8859-2?B?dSB1bmRlcnN0YW5kIHRoZSBleGFtcGxlLg==?=',
      ),
    ).toBe('If you can read this you understand the example.');
    // §8: white space between adjacent encoded words is not displayed; between an encoded word and text it is
    expect(decodeEncodedWords('(=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=)')).toBe('(ab)');
    expect(decodeEncodedWords('(=?ISO-8859-1?Q?a?= b)')).toBe('(a b)');
    expect(decodeEncodedWords('(=?ISO-8859-1?Q?a_b?=)')).toBe('(a b)');
  });

  test('RFC 2045 §6.7 quoted-printable: =XX octets and soft line breaks', () => {
    const dec = (s: string) => Buffer.from(decodeQuotedPrintable(s)).toString('utf8');
    expect(dec("Now's the time =\r\nfor all folk to come=\r\n to the aid of their country.")).toBe(
      "Now's the time for all folk to come to the aid of their country.",
    );
    expect(dec('caf=C3=A9 =3D 1')).toBe('café = 1');
  });

  test('RFC 5322 address lists: display names, quoted commas, bare addresses', () => {
    expect(
      addresses('Pete <pete@silly.example>, "Giant; \\"Big\\" Box" <sysservices@example.net>, Mary@x.test'),
    ).toEqual(['pete@silly.example', 'sysservices@example.net', 'mary@x.test']);
  });

  test('folded header lines are unfolded (RFC 5322 §2.2.3) and a missing body is empty text', () => {
    const raw = Buffer.from(
      'From: a@b.test\r\nSubject: This is a test\r\n  of folding\r\nTo: c@d.test\r\n\r\n',
      'latin1',
    );
    const m = parseMessage(raw);
    expect(m.subject).toBe('This is a test  of folding');
    expect(m.to).toEqual(['c@d.test']);
    expect(m.text).toBe('');
  });
});
