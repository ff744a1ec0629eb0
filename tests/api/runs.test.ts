// The runs API: uploads (loose files and bundles, limits, unsafe members, reuse by
// hash, invalid UTF-8), submitting, listing, detail, findings paging with sorts and
// filters, the files for the editor view, cancelling by role, and comparing runs.
// Finished runs come from a real worker process. Expected findings come from the
// netlists' construction (runs-helpers.ts nandBlock) and from the checker run in
// this process on the same text.
//
// Limits here are small (32 KiB per file, 64 KiB per upload, 4 files) so that the
// 413 answers can be reached with small bodies.

import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import * as tar from 'tar';
import yazl from 'yazl';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { Block, MailMessage, RuleDeckVersion, Team, User, Waiver } from '../../server/db/models';
import { DEMO_TEAM, DEMO_USERS, seedDemo } from '../../server/seed/demo';
import { DEMO_WAIVERS, seedDemoWaivers } from '../../server/seed/demo-waivers';
import { createTeam, signIn, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { makeRunTeamSetup, nandBlock, startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';

let env: TestEnv;
let worker: WorkerProcess;

beforeAll(async () => {
  env = await startTestEnv({
    KEEPWELL_LOGIN_MAX_PER_IP: '1000',
    KEEPWELL_UPLOAD_MAX_FILE_BYTES: String(32 * 1024),
    KEEPWELL_UPLOAD_MAX_TOTAL_BYTES: String(64 * 1024),
    KEEPWELL_UPLOAD_MAX_FILES: '4',
  });
  worker = startWorker(env);
  await worker.ready;
});
afterAll(async () => {
  await worker?.stop();
  await env?.close();
});

function zip(entries: { name: string; content: Buffer | string; mode?: number }[]): Promise<Buffer> {
  const z = new yazl.ZipFile();
  for (const e of entries) z.addBuffer(Buffer.isBuffer(e.content) ? e.content : Buffer.from(e.content), e.name, e.mode ? { mode: e.mode } : {});
  z.end();
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    z.outputStream.on('data', (c: Buffer) => chunks.push(c));
    z.outputStream.on('end', () => resolve(Buffer.concat(chunks)));
    z.outputStream.on('error', reject);
  });
}

/** yazl refuses to write unsafe names, as it should; write a harmless one and patch it in place (names are not covered by the CRC, APPNOTE.TXT 4.4.7). */
function renamed(bytes: Buffer, from: string, to: string): Buffer {
  if (from.length !== to.length) throw new Error('same length only');
  const out = Buffer.from(bytes);
  let at = out.indexOf(from);
  while (at >= 0) {
    out.write(to, at, 'latin1');
    at = out.indexOf(from, at + 1);
  }
  return out;
}

/** A tar (gzipped unless told otherwise) of files laid out in a temporary folder; `links` become symbolic links. */
async function tarball(files: Record<string, Buffer | string>, options: { gzip?: boolean; links?: Record<string, string>; paths?: string[]; cwdSub?: string } = {}): Promise<Buffer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keepwell-tar-'));
  try {
    for (const [name, content] of Object.entries(files)) {
      fs.mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
      fs.writeFileSync(path.join(dir, name), content);
    }
    for (const [name, target] of Object.entries(options.links ?? {})) fs.symlinkSync(target, path.join(dir, name));
    const cwd = options.cwdSub ? path.join(dir, options.cwdSub) : dir;
    fs.mkdirSync(cwd, { recursive: true });
    const out = path.join(os.tmpdir(), `keepwell-${process.pid}-${Date.now()}.tar`);
    await tar.c({ file: out, cwd, gzip: options.gzip ?? true, portable: true, preservePaths: true }, options.paths ?? [...Object.keys(files), ...Object.keys(options.links ?? {})]);
    const bytes = fs.readFileSync(out);
    fs.rmSync(out);
    return bytes;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

function reference(files: Record<string, string>) {
  const deck = defaultDeck();
  return checkDesign(readDesign(files, { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies }), deck).findings;
}

async function teamWith(roles: ('designer' | 'reviewer' | 'methodology' | 'admin')[][]) {
  const team = await createTeam();
  const setup = await makeRunTeamSetup(team);
  const users = [];
  for (const r of roles) users.push(await signedInAs(env, team, r));
  return { team, ...setup, users };
}

const upload = (agent: ReturnType<TestEnv['agent']>, blockId: string, files: Record<string, Buffer | string>) => {
  let req = agent.post('/api/uploads').field('blockId', blockId);
  for (const [name, content] of Object.entries(files)) req = req.attach('files', Buffer.isBuffer(content) ? content : Buffer.from(content), name);
  return req;
};

// An include relative to the including file, as SPICE resolves it.
const TOP = '* Lantern bundle top\n.include "lib/cells.inc"\n.subckt lantern_pair a y vdd vss\nx1 a m vdd vss linv\nx2 m y vdd vss linv\n.ends\n';
const CELLS = '* Lantern cell library\n.subckt linv a y vdd vss\nmp y a vdd vdd pch w=1u l=0.25u\nmn y a vss vss nch w=0.5u l=0.25u\n.ends\n';

describe('uploads', () => {
  it('take loose netlists and bundles with their includes, leave out what is not a netlist, and recognise a re-upload by its hash', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const bundle = await zip([
      { name: 'top.sp', content: TOP },
      { name: 'lib/cells.inc', content: CELLS },
      { name: 'README.md', content: 'notes' },
    ]);
    const first = await upload(agent, block.id, { 'lantern.zip': bundle }).expect(201);
    expect(first.body.reused).toBe(false);
    expect(first.body.netlist.files.map((f: { path: string }) => f.path)).toEqual(['lib/cells.inc', 'top.sp']);
    expect(first.body.ignored.map((i: { path: string }) => i.path)).toEqual(['README.md']);
    // SHA-256 of the stored bytes (FIPS 180-4), computed here independently.
    const { createHash } = await import('node:crypto');
    expect(first.body.netlist.files.find((f: { path: string }) => f.path === 'top.sp').sha256).toBe(createHash('sha256').update(TOP).digest('hex'));

    // The same files as a gzipped tar, in another order: the same set, so the same stored netlist.
    const again = await upload(agent, block.id, { 'lantern.tar.gz': await tarball({ 'lib/cells.inc': CELLS, 'top.sp': TOP }) }).expect(200);
    expect(again.body.reused).toBe(true);
    expect(again.body.netlist.id).toBe(first.body.netlist.id);
    // One byte more is another set.
    const changed = await upload(agent, block.id, { 'lantern.zip': await zip([{ name: 'top.sp', content: TOP + '\n' }, { name: 'lib/cells.inc', content: CELLS }]) }).expect(201);
    expect(changed.body.netlist.id).not.toBe(first.body.netlist.id);
  });

  it('refuse members that could escape the bundle: "..", absolute paths, links', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const cases: [string, Buffer][] = [
      ['climb.zip', renamed(await zip([{ name: 'ok.sp', content: CELLS }, { name: 'lib/QQ/QQ/evil.sp', content: CELLS }]), 'QQ/QQ', '../..')],
      ['absolute.zip', renamed(await zip([{ name: 'Q_/windows/evil.sp', content: CELLS }]), 'Q_/', 'C:/')],
      // S_IFLNK in the upper bits of the external attributes marks a symbolic link (APPNOTE.TXT 4.4.15, with POSIX st_mode).
      ['link.zip', await zip([{ name: 'cells.inc', content: '/etc/passwd', mode: 0o120777 }])],
      ['link.tar.gz', await tarball({ 'top.sp': TOP }, { links: { 'cells.inc': '/etc/passwd' } })],
      ['climb.tar', await tarball({ 'x/top.sp': TOP, 'evil.sp': CELLS }, { gzip: false, cwdSub: 'x', paths: ['top.sp', '../evil.sp'] })],
    ];
    for (const [name, bytes] of cases) {
      const res = await upload(agent, block.id, { [name]: bytes });
      expect(res.status, `${name}: ${JSON.stringify(res.body)}`).toBe(400);
      expect(res.body.error.code).toBe('unsafe-archive');
      expect(res.body.error.message).toContain(name);
    }
  });

  it('answer 413 naming the limit: per file, per upload, file count, and zip or gzip bombs counted as they inflate', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const filler = (n: number) => Buffer.from(`* filler\n${'*'.repeat(n - 10)}\n`);

    let res = await upload(agent, block.id, { 'big.sp': filler(40 * 1024) });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('32 KiB');

    res = await upload(agent, block.id, { 'a.sp': filler(25 * 1024), 'b.sp': filler(25 * 1024), 'c.sp': filler(25 * 1024) });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('64 KiB');

    res = await upload(agent, block.id, Object.fromEntries(Array.from({ length: 5 }, (_, i) => [`f${i}.sp`, CELLS])));
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('at most 4 files');

    // 10 MiB of one repeated byte deflates to about 10 KB (RFC 1951 back-references): a bomb for these limits.
    const bomb = await zip([{ name: 'bomb.sp', content: Buffer.alloc(10 * 1024 * 1024, 0x2a) }]);
    expect(bomb.length).toBeLessThan(32 * 1024);
    res = await upload(agent, block.id, { 'bomb.zip': bomb });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/bomb\.sp unpacks to more than 32 KiB/);

    const spread = await zip(['a', 'b', 'c'].map((n) => ({ name: `${n}.sp`, content: Buffer.alloc(30 * 1024, 0x2a) })));
    res = await upload(agent, block.id, { 'spread.zip': spread });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('64 KiB');

    const gz = zlib.gzipSync(Buffer.alloc(10 * 1024 * 1024, 0));
    res = await upload(agent, block.id, { 'bomb.tar.gz': gz });
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/decompresses to more than/);
  });

  it('refuse what is not a netlist, and need a file and a block of the team', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    let res = await upload(agent, block.id, { 'layout.gds': Buffer.from([0, 6, 0, 2]) });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('unsupported-file');
    res = await agent.post('/api/uploads').field('blockId', block.id);
    expect(res.status).toBe(400);
    res = await agent.post('/api/uploads').send({ blockId: block.id });
    expect(res.status).toBe(415);
    const other = await teamWith([]);
    res = await upload(agent, other.block.id, { 'a.sp': CELLS });
    expect(res.status).toBe(404);
  });

  it('read invalid UTF-8 with replacement characters and say where, without failing the run', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    // 0xE9 opens a three-byte sequence that 0xFF cannot continue, and 0xFF never occurs in UTF-8 (RFC 3629 §§1, 3):
    // two replacement characters (WHATWG Encoding, maximal subparts), the first at line 2, column 4.
    const bytes = Buffer.concat([Buffer.from('* Lantern latin-1 comment\n* r'), Buffer.from([0xe9, 0xff]), Buffer.from('sum\n'), Buffer.from(CELLS.split('\n').slice(1).join('\n'))]);
    const res = await submitUpload(agent, block.id, { 'latin.sp': bytes });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.upload.diagnostics).toEqual([
      expect.objectContaining({ code: 'invalid-utf8', severity: 'warning', file: 'latin.sp', line: 2, column: 4, message: expect.stringMatching(/^2 characters/) }),
    ]);
    const run = await waitForRun(agent, res.body.run.id);
    expect(run.state, run.error ?? '').toBe('succeeded');
    const detail = (await agent.get(`/api/runs/${run.id}`).expect(200)).body;
    expect(detail.diagnostics.map((d: { code: string }) => d.code)).toContain('invalid-utf8');
    const file = await agent.get(`/api/runs/${run.id}/file`).query({ path: 'latin.sp' }).expect(200);
    expect(file.body.text.split('\n')[1]).toBe('* r\uFFFD\uFFFDsum');
  });

  it('are for submitters only', async () => {
    const { block, users } = await teamWith([['reviewer'], ['methodology']]);
    expect((await upload(env.agent(), block.id, { 'a.sp': CELLS })).status).toBe(401);
    expect((await upload(users[0].agent, block.id, { 'a.sp': CELLS })).status).toBe(403);
    expect((await upload(users[1].agent, block.id, { 'a.sp': CELLS })).status).toBe(201);
  });
});

describe('runs', () => {
  it('list with filters and pages, and show a detail with per-rule and per-cell counts', async () => {
    const { block, users, team } = await teamWith([['designer'], ['designer']]);
    const [a, b] = users;
    const other = await (await import('../../server/db/models')).Block.create({ teamId: team.id, name: 'lantern-other', createdBy: null });
    const texts = [nandBlock(6, (i) => i < 2, 'la'), nandBlock(7, (i) => i < 3, 'lb'), nandBlock(5, () => false, 'lc')];
    const r1 = (await submitUpload(a.agent, block.id, { 'a.sp': texts[0] }).expect(201)).body.run;
    const r2 = (await submitUpload(b.agent, block.id, { 'b.sp': texts[1] }).expect(201)).body.run;
    const r3 = (await submitUpload(a.agent, other.id, { 'c.sp': texts[2] }).expect(201)).body.run;
    for (const r of [r1, r2, r3]) expect((await waitForRun(a.agent, r.id)).state).toBe('succeeded');

    const all = (await a.agent.get('/api/runs').expect(200)).body;
    expect(all.total).toBe(3);
    expect(all.items.map((r: { id: string }) => r.id)).toEqual([r3.id, r2.id, r1.id]);
    const byBlock = (await a.agent.get('/api/runs').query({ blockId: block.id }).expect(200)).body;
    expect(byBlock.items.map((r: { id: string }) => r.id)).toEqual([r2.id, r1.id]);
    const mine = (await a.agent.get('/api/runs').query({ submittedBy: 'me' }).expect(200)).body;
    expect(mine.items.map((r: { id: string }) => r.id)).toEqual([r3.id, r1.id]);
    const theirs = (await a.agent.get('/api/runs').query({ submittedBy: b.user.id, state: 'succeeded,failed' }).expect(200)).body;
    expect(theirs.items.map((r: { id: string }) => r.id)).toEqual([r2.id]);
    expect((await a.agent.get('/api/runs').query({ state: 'queued' }).expect(200)).body.total).toBe(0);
    const page2 = (await a.agent.get('/api/runs').query({ page: 2, pageSize: 2 }).expect(200)).body;
    expect(page2.items.map((r: { id: string }) => r.id)).toEqual([r1.id]);
    expect((await a.agent.get('/api/runs').query({ state: 'bogus' })).status).toBe(400);

    const detail = (await a.agent.get(`/api/runs/${r2.id}`).expect(200)).body;
    expect(detail.caution).toMatch(/never replace/);
    expect(detail.files.map((f: { path: string }) => f.path)).toEqual(['b.sp']);
    const expected = reference({ 'b.sp': texts[1] });
    const total = detail.breakdown.byRule.reduce((n: number, r: { findings: number }) => n + r.findings, 0);
    expect(total).toBe(expected.length);
    expect(detail.breakdown.byCell.map((c: { cell: string }) => c.cell).sort()).toEqual([...new Set(expected.map((f) => f.cell))].sort());
    expect(detail.submitter.id).toBe(b.user.id);
    expect(detail.deck.version).toBe(1);

    // Another team sees none of it.
    const stranger = await teamWith([['admin']]);
    expect((await stranger.users[0].agent.get(`/api/runs/${r1.id}`)).status).toBe(404);
    expect((await stranger.users[0].agent.get('/api/runs').expect(200)).body.total).toBe(0);
  });

  it('page findings on the server with sorts and filters, and mark waived ones', async () => {
    const { block, users, team } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const text = nandBlock(12, (i) => i % 2 === 0, 'lf');
    const run = (await submitUpload(agent, block.id, { 'f.sp': text }).expect(201)).body.run;
    expect((await waitForRun(agent, run.id)).state).toBe('succeeded');
    const expected = reference({ 'f.sp': text });
    expect(expected.length).toBeGreaterThanOrEqual(6);

    const page1 = (await agent.get(`/api/runs/${run.id}/findings`).query({ pageSize: 4 }).expect(200)).body;
    const page2 = (await agent.get(`/api/runs/${run.id}/findings`).query({ pageSize: 4, page: 2 }).expect(200)).body;
    expect(page1.total).toBe(expected.length);
    const ids = [...page1.items, ...page2.items].map((f: { id: number }) => f.id);
    expect(new Set(ids).size).toBe(ids.length);

    const byLocation = (await agent.get(`/api/runs/${run.id}/findings`).query({ sort: 'location', order: 'desc', pageSize: 500 }).expect(200)).body.items;
    const lines = byLocation.map((f: { line: number }) => f.line);
    expect(lines).toEqual([...lines].sort((x, y) => y - x));
    const bySeverity = (await agent.get(`/api/runs/${run.id}/findings`).query({ sort: 'severity', pageSize: 500 }).expect(200)).body.items;
    const rank = { error: 0, warning: 1, info: 2 } as Record<string, number>;
    const ranks = bySeverity.map((f: { severity: string }) => rank[f.severity]);
    expect(ranks).toEqual([...ranks].sort((x, y) => x - y));

    expect((await agent.get(`/api/runs/${run.id}/findings`).query({ file: 'f.sp' }).expect(200)).body.total).toBe(expected.length);
    expect((await agent.get(`/api/runs/${run.id}/findings`).query({ file: 'other.sp', severity: 'error' }).expect(200)).body.total).toBe(0);
    const sized = (await agent.get(`/api/runs/${run.id}/findings`).query({ rule: 'device.implausible-size', severity: 'error' }).expect(200)).body;
    expect(sized.total).toBe(6);
    const oneCell = (await agent.get(`/api/runs/${run.id}/findings`).query({ cell: 'lf4' }).expect(200)).body;
    expect(oneCell.items.map((f: { cell: string }) => f.cell)).toEqual(expected.filter((f) => f.cell === 'lf4').map((f) => f.cell));
    // Text search covers device names: mn1 is the oversized pull-down in every flagged cell; "_" is not a wildcard.
    expect((await agent.get(`/api/runs/${run.id}/findings`).query({ q: 'MN1' }).expect(200)).body.total).toBe(6);
    expect((await agent.get(`/api/runs/${run.id}/findings`).query({ q: 'm_1' }).expect(200)).body.total).toBe(0);

    const target = sized.items[0];
    await Waiver.create({
      teamId: team.id,
      blockId: block.id,
      ruleId: target.ruleId,
      cell: target.cell,
      fingerprint: target.fingerprint,
      scope: 'finding',
      justification: 'test waiver: drawn that wide on purpose',
      state: 'approved',
      requestedBy: users[0].user.id,
      decidedBy: null,
      decisionComment: null,
      decidedAt: new Date(),
      expiresAt: null,
      bound: null,
    });
    const waived = (await agent.get(`/api/runs/${run.id}/findings`).query({ status: 'waived' }).expect(200)).body;
    expect(waived.items.map((f: { fingerprint: string; status: string }) => [f.fingerprint, f.status])).toEqual([[target.fingerprint, 'waived']]);
    expect((await agent.get(`/api/runs/${run.id}/findings`).query({ status: 'open' }).expect(200)).body.total).toBe(expected.length - 1);
  });

  it('serve the files for the editor as JSON or plain text, never as HTML', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const html = '* <script>alert(1)</script>\n' + CELLS;
    const run = (await submitUpload(agent, block.id, { 'page.sp': html }).expect(201)).body.run;
    const files = (await agent.get(`/api/runs/${run.id}/files`).expect(200)).body;
    expect(files.items).toEqual([expect.objectContaining({ path: 'page.sp', size: Buffer.byteLength(html) })]);
    const json = await agent.get(`/api/runs/${run.id}/file`).query({ path: 'page.sp' }).expect(200);
    expect(json.headers['content-type']).toMatch(/^application\/json/);
    expect(json.body.text).toBe(html);
    const text = await agent.get(`/api/runs/${run.id}/file`).query({ path: 'page.sp' }).set('Accept', 'text/plain').expect(200);
    expect(text.headers['content-type']).toMatch(/^text\/plain; charset=utf-8/);
    expect(text.headers['x-content-type-options']).toBe('nosniff');
    expect(text.text).toBe(html);
    const asHtml = await agent.get(`/api/runs/${run.id}/file`).query({ path: 'page.sp' }).set('Accept', 'text/html').expect(200);
    expect(asHtml.headers['content-type']).not.toMatch(/html/);
    expect((await agent.get(`/api/runs/${run.id}/file`).query({ path: 'other.sp' })).status).toBe(404);
  });

  it('are cancelled by their submitter or an admin only', async () => {
    const { block, users } = await teamWith([['designer'], ['designer'], ['reviewer'], ['admin'], ['methodology']]);
    const [owner, colleague, reviewer, admin, methodology] = users;
    // Each run is cancelled moments after it is submitted, queued or just started.
    const submit = async (who: typeof owner) => (await submitUpload(who.agent, block.id, { 'c.sp': nandBlock(100) }).expect(201)).body.run.id as string;
    const r1 = await submit(owner);
    expect((await env.agent().post(`/api/runs/${r1}/cancel`)).status).toBe(401);
    expect((await reviewer.agent.post(`/api/runs/${r1}/cancel`)).status).toBe(403);
    expect((await colleague.agent.post(`/api/runs/${r1}/cancel`)).status).toBe(403);
    expect((await methodology.agent.post(`/api/runs/${r1}/cancel`)).status).toBe(403);
    expect((await owner.agent.post(`/api/runs/${r1}/cancel`).expect(200)).body.state).toBe('cancelled');
    expect((await owner.agent.post(`/api/runs/${r1}/cancel`)).status).toBe(409);
    const r2 = await submit(colleague);
    expect((await admin.agent.post(`/api/runs/${r2}/cancel`).expect(200)).body.state).toBe('cancelled');
    const m = await submit(methodology);
    expect((await methodology.agent.post(`/api/runs/${m}/cancel`).expect(200)).body.state).toBe('cancelled');
    // The colleague is told an admin cancelled their run; the owner who cancelled their own is not mailed.
    const mail = await env.smtp.waitFor((msg) => msg.to.includes(colleague.email) && /cancelled/.test(msg.subject));
    expect(mail.text).toContain(admin.user.name);
  });

  it('re-run a stored netlist by id, with the default or a named published version', async () => {
    const { block, users, deck } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const first = (await submitUpload(agent, block.id, { 'r.sp': CELLS }).expect(201)).body.run;
    const again = (await agent.post('/api/runs').send({ netlistId: first.netlistId, note: 'again' }).expect(201)).body.run;
    expect(again.netlistId).toBe(first.netlistId);
    expect(again.deck.versionId).toBe(first.deck.versionId);
    const draft = await RuleDeckVersion.create({
      deckId: deck.id,
      version: 2,
      state: 'draft',
      content: defaultDeck(),
      createdBy: null,
      publishedBy: null,
      publishedAt: null,
      parentVersionId: null,
    });
    expect((await agent.post('/api/runs').send({ netlistId: first.netlistId, deckVersionId: draft.id })).status).toBe(409);
    expect((await agent.post('/api/runs').send({ netlistId: '00000000-0000-4000-8000-000000000000' })).status).toBe(404);
  });

  it('compare two runs of a block by fingerprint: new, fixed, persisting', async () => {
    const { block, users } = await teamWith([['designer']]);
    const agent = users[0].agent;
    const before = nandBlock(4, (i) => i === 0 || i === 1, 'lk');
    const after = nandBlock(4, (i) => i === 1 || i === 2, 'lk');
    const base = (await submitUpload(agent, block.id, { 'k.sp': before }).expect(201)).body.run;
    const head = (await submitUpload(agent, block.id, { 'k.sp': after }).expect(201)).body.run;
    for (const r of [base, head]) expect((await waitForRun(agent, r.id)).state).toBe('succeeded');

    const fpBefore = new Set(reference({ 'k.sp': before }).map((f) => f.fingerprint));
    const fpAfter = new Set(reference({ 'k.sp': after }).map((f) => f.fingerprint));
    const expectNew = [...fpAfter].filter((f) => !fpBefore.has(f));
    const expectFixed = [...fpBefore].filter((f) => !fpAfter.has(f));
    const expectPersisting = [...fpAfter].filter((f) => fpBefore.has(f));
    expect(expectNew.length).toBeGreaterThan(0);
    expect(expectFixed.length).toBeGreaterThan(0);
    expect(expectPersisting.length).toBeGreaterThan(0);

    for (const [kind, expected] of [['new', expectNew], ['fixed', expectFixed], ['persisting', expectPersisting]] as const) {
      const res = (await agent.get(`/api/runs/${head.id}/compare/${base.id}`).query({ kind }).expect(200)).body;
      expect(res.counts).toEqual({ new: expectNew.length, fixed: expectFixed.length, persisting: expectPersisting.length });
      expect(res.items.map((f: { fingerprint: string }) => f.fingerprint).sort()).toEqual([...expected].sort());
    }
    const elsewhere = await teamWith([['designer']]);
    expect((await agent.get(`/api/runs/${head.id}/compare/${elsewhere.block.id}`)).status).toBe(404);
  });
});

describe('the demo seed', () => {
  it('queues the demo netlists as runs that a worker finishes, with findings to look at', async () => {
    await seedDemo(env.ctx.sequelize);
    await seedDemo(env.ctx.sequelize); // idempotent: no second run of the same netlist
    const team = (await Team.findOne({ where: { name: DEMO_TEAM } }))!;
    const designer = DEMO_USERS.find((u) => u.roles.includes('designer'))!;
    const user = (await User.findOne({ where: { email: designer.email } }))!;
    const agent = await signIn(env, user.email, designer.password);
    const listed = (await agent.get('/api/runs').expect(200)).body;
    expect(listed.total).toBeGreaterThan(0);
    expect(new Set(listed.items.map((r: { netlistId: string }) => r.netlistId)).size).toBe(listed.total);
    for (const item of listed.items) {
      const run = await waitForRun(agent, item.id, undefined, { timeoutMs: 60_000 });
      expect(run.state, run.error ?? '').toBe('succeeded');
      expect(run.submitter?.email).toBe(designer.email);
    }
    const blocks = await Block.findAll({ where: { teamId: team.id } });
    expect(listed.items.every((r: { block: { id: string } }) => blocks.some((b) => b.id === r.block.id))).toBe(true);
    // A first screen with results: the demo holds at least one error finding. The starter netlist's ratioed
    // decoder has |gain| < 1 at its switching threshold, so it cannot restore a level (the trade's rule).
    let total = 0;
    for (const item of listed.items) total += (await agent.get(`/api/runs/${item.id}/findings`).query({ severity: 'error' }).expect(200)).body.total;
    expect(total).toBeGreaterThan(0);

    // Both ends of the waiver flow, on findings of the finished runs: a reviewer's waiver with a bound and an
    // expiry, and a designer's request waiting for a reviewer (whose mail is queued).
    const now = new Date();
    const made = await seedDemoWaivers(env.ctx, now);
    expect(made).toHaveLength(DEMO_WAIVERS.length);
    expect(await seedDemoWaivers(env.ctx)).toEqual([]); // idempotent
    const waivers = await Waiver.findAll({ where: { teamId: team.id }, order: [['createdAt', 'asc']] });
    expect(waivers.map((w) => [w.ruleId, w.cell, w.state, w.scope])).toEqual([
      ['chain.non-restoring', 'lsc_obsmux', 'approved', 'finding'],
      ['dynamic.keeper-ratio', 'lantern_alu_slice', 'requested', 'finding'],
    ]);
    expect(waivers[0].bound).toEqual({ value: 4, unit: 'count', sense: 'max' });
    // 180 days on, to the end of that day (UTC).
    const lastDay = new Date(now.getTime() + 180 * 86_400_000).toISOString().slice(0, 10);
    expect(waivers[0].expiresAt?.toISOString()).toBe(new Date(Date.parse(`${lastDay}T00:00:00Z`) + 86_400_000).toISOString());
    const reviewer = DEMO_USERS.find((u) => u.roles.includes('reviewer'))!;
    const mails = await MailMessage.findAll({ where: { teamId: team.id, subject: 'Keepwell: waiver requested for dynamic.keeper-ratio in lantern_alu_slice' } });
    expect(mails.map((m) => m.to)).toEqual([reviewer.email]);
    const statusOf = async (ruleId: string, cell: string) => {
      for (const item of listed.items) {
        const page = (await agent.get(`/api/runs/${item.id}/findings`).query({ rule: ruleId, cell }).expect(200)).body;
        if (page.total) return page.items.map((f: { status: string }) => f.status);
      }
      return [];
    };
    expect(await statusOf('chain.non-restoring', 'lsc_obsmux')).toEqual(['waived']);
    expect(await statusOf('dynamic.keeper-ratio', 'lantern_alu_slice')).toEqual(['waiver-requested']);
  });
});
