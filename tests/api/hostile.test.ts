// The hostile-input corpus, generated here (nothing binary is committed), sent through the
// real upload API and a real worker process. Every input must end cleanly: a refused upload
// with a 4xx that says what is wrong, or a failed run whose message names the problem and
// where it is. Each is timed from submission to its end, the worker's peak resident memory
// is read from Linux's VmHWM (proc(5), reset per input through clear_refs value 5), and
// meanwhile a second team's health and findings requests must keep being answered promptly
// and its own run must finish with exactly the findings the in-process checker gives.
//
// The figures (input, outcome, elapsed, worker peak) are printed and written to
// test-artifacts/hostile/figures.json for the README's Testing section.

import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import * as tar from 'tar';
import yazl from 'yazl';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { repoRoot } from '../../server/config';
import { createTeam, PUBLIC_URL, serverUrl, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { makeRunTeamSetup, nandBlock, startWorker, storedFindings, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';

const MiB = 1024 * 1024;
/** Bounds every input must stay within on this 2-core machine, with other test files running beside it. */
const BOUNDS = { elapsedMs: 30_000, workerPeakBytes: 640 * MiB, probeMs: 2_000 };

let env: TestEnv;
let worker: WorkerProcess;
let hostile: Awaited<ReturnType<typeof teamWithBlock>>;
let bystander: Awaited<ReturnType<typeof teamWithBlock>>;
let bystanderRun: string;
let bystanderText: string;
let probes: Probes;

interface Figure {
  input: string;
  outcome: string;
  message: string;
  elapsedMs: number;
  workerPeakMiB: number | null;
}
const figures: Figure[] = [];

async function teamWithBlock() {
  const team = await createTeam();
  const { block } = await makeRunTeamSetup(team, 'lantern-hostile-block');
  const designer = await signedInAs(env, team, ['designer']);
  return { team, block, ...designer };
}

// ---------------------------------------------------------------- the worker's memory

/** Peak resident set size of a process since the last reset, from /proc/<pid>/status (proc(5): VmHWM, in kB). */
function peakRss(pid: number): number {
  const line = fs.readFileSync(`/proc/${pid}/status`, 'utf8').split('\n').find((l) => l.startsWith('VmHWM:'));
  return Number(/(\d+)/.exec(line ?? '')?.[1] ?? NaN) * 1024;
}

/** Start a new peak from the current resident size (proc(5), /proc/<pid>/clear_refs: writing 5 resets VmHWM). */
function resetPeakRss(pid: number): void {
  fs.writeFileSync(`/proc/${pid}/clear_refs`, '5');
}

// ---------------------------------------------------------------- another team, meanwhile

interface Probes {
  stop(): Promise<{ what: string; ms: number; status: number }[]>;
}

/** Ask for health and for the bystander's findings every 200 ms until stopped, timing each answer. */
function startProbes(base: string, cookie: string, runId: string): Probes {
  const results: { what: string; ms: number; status: number }[] = [];
  let running = true;
  const loop = (async () => {
    while (running) {
      for (const [what, url] of [
        ['health', '/api/health'],
        ['findings', `/api/runs/${runId}/findings?pageSize=50`],
      ] as const) {
        const started = performance.now();
        const res = await fetch(base + url, { headers: { cookie } });
        await res.arrayBuffer();
        results.push({ what, ms: performance.now() - started, status: res.status });
      }
      await new Promise((r) => setTimeout(r, 200));
    }
  })();
  return {
    async stop() {
      running = false;
      await loop;
      return results;
    },
  };
}

// ---------------------------------------------------------------- generated inputs

/** A deterministic byte stream (xorshift32, Marsaglia 2003) so that a failure can be reproduced. */
function junkBytes(n: number, seed = 0x2545f491): Buffer {
  const out = Buffer.alloc(n);
  let x = seed;
  for (let i = 0; i < n; i++) {
    x ^= x << 13;
    x ^= x >>> 17;
    x ^= x << 5;
    out[i] = x & 0xff;
  }
  return out;
}

const INVERTER = '.subckt linv a y vdd vss\nmp y a vdd vdd pch w=1u l=0.25u\nmn y a vss vss nch w=0.5u l=0.25u\n.ends\n';

/** Each cell instantiates the one below it once: `levels` levels under the top cell. */
function deepHierarchy(levels: number): string {
  let text = '* Lantern hostile: a hierarchy nested level under level\n' + INVERTER.replace('linv', 'ldeep0');
  for (let i = 1; i < levels; i++) text += `.subckt ldeep${i} a y vdd vss\nx1 a y vdd vss ldeep${i - 1}\n.ends\n`;
  return text;
}

/** Each cell instantiates the one below it twice: 2^levels inverters under the top cell. */
function fanningHierarchy(levels: number): string {
  let text = '* Lantern hostile: every level doubles the one below\n' + INVERTER.replace('linv', 'lfan0');
  for (let i = 1; i <= levels; i++) text += `.subckt lfan${i} a y vdd vss\nx1 a m vdd vss lfan${i - 1}\nx2 m y vdd vss lfan${i - 1}\n.ends\n`;
  return text;
}

function zipOf(entries: { name: string; content: Buffer | Readable }[]): Promise<Buffer> {
  const z = new yazl.ZipFile();
  for (const e of entries) {
    if (Buffer.isBuffer(e.content)) z.addBuffer(e.content, e.name);
    else z.addReadStream(e.content, e.name);
  }
  z.end();
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    z.outputStream.on('data', (c: Buffer) => chunks.push(c));
    z.outputStream.on('end', () => resolve(Buffer.concat(chunks)));
    z.outputStream.on('error', reject);
  });
}

/** `bytes` of one repeated byte, produced a MiB at a time (the test never holds them all). */
function repeatedStream(bytes: number, fill = 0x20): Readable {
  const chunk = Buffer.alloc(MiB, fill);
  let left = bytes;
  return new Readable({
    read() {
      if (left <= 0) return void this.push(null);
      const n = Math.min(left, chunk.length);
      left -= n;
      this.push(n === chunk.length ? chunk : chunk.subarray(0, n));
    },
  });
}

/**
 * yazl refuses to write an unsafe member name, as it should: write a harmless name of the same
 * length and overwrite it in place (APPNOTE.TXT 4.4.7: the CRC covers the data, not the name).
 */
function renamedMember(bytes: Buffer, from: string, to: string): Buffer {
  const out = Buffer.from(bytes);
  for (let at = out.indexOf(from); at >= 0; at = out.indexOf(from, at + 1)) out.write(to, at, 'latin1');
  return out;
}

/** A tar whose second member is stored as `../escape.sp` (POSIX ustar names are taken as written). */
async function climbingTar(): Promise<Buffer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keepwell-hostile-tar-'));
  try {
    fs.mkdirSync(path.join(dir, 'inner'));
    fs.writeFileSync(path.join(dir, 'inner', 'top.sp'), `* top\n${INVERTER}`);
    fs.writeFileSync(path.join(dir, 'escape.sp'), `* escape\n${INVERTER}`);
    const out = path.join(dir, 'climb.tar');
    await tar.c({ file: out, cwd: path.join(dir, 'inner'), portable: true, preservePaths: true }, ['top.sp', '../escape.sp']);
    return fs.readFileSync(out);
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

// ---------------------------------------------------------------- streaming an upload

interface StreamedAnswer {
  status: number;
  body: { error?: { code: string; message: string } };
  /** Body bytes handed to the socket when the answer arrived (at least what the server had read). */
  sentWhenAnswered: number;
  sentInAll: number;
}

/**
 * POST a multipart body of `files` (name → byte count of generated netlist text) with chunked
 * transfer coding, so the server cannot know the size in advance (RFC 9112 §7.1) and must count
 * while it reads. The bytes are made as they are sent: the test holds one MiB at a time.
 */
function streamUpload(base: string, cookie: string, blockId: string, files: { name: string; bytes: number }[]): Promise<StreamedAnswer> {
  const boundary = `----keepwell-hostile-${Date.now()}`;
  const line = Buffer.from('* Lantern hostile filler: a comment line repeated to size the upload\n');
  const block = Buffer.concat(Array.from({ length: Math.ceil(MiB / line.length) }, () => line)).subarray(0, MiB);
  let sent = 0;
  async function* body() {
    yield Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="blockId"\r\n\r\n${blockId}\r\n`);
    for (const f of files) {
      yield Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="files"; filename="${f.name}"\r\nContent-Type: text/plain\r\n\r\n`);
      for (let left = f.bytes; left > 0; left -= block.length) {
        const piece = left >= block.length ? block : block.subarray(0, left);
        sent += piece.length;
        yield piece;
      }
      yield Buffer.from('\r\n');
    }
    yield Buffer.from(`--${boundary}--\r\n`);
  }
  return new Promise((resolve, reject) => {
    const req = http.request(`${base}/api/runs`, {
      method: 'POST',
      headers: { cookie, origin: PUBLIC_URL, 'content-type': `multipart/form-data; boundary=${boundary}`, 'transfer-encoding': 'chunked' },
    });
    let answered = false;
    req.on('response', (res) => {
      answered = true;
      const sentWhenAnswered = sent;
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => {
        req.destroy();
        resolve({ status: res.statusCode ?? 0, body: JSON.parse(Buffer.concat(chunks).toString('utf8') || '{}'), sentWhenAnswered, sentInAll: sent });
      });
    });
    // Once the answer is in, the server may close the connection under our feet: that is its right.
    req.on('error', (err) => (answered ? undefined : reject(err)));
    Readable.from(body()).pipe(req).on('error', () => {});
  });
}

async function cookieOf(email: string, password: string): Promise<string> {
  const res = await fetch(`${serverUrl(env.server)}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: PUBLIC_URL },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`);
  return res.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ');
}

// ---------------------------------------------------------------- one input, end to end

/** Submit through the API; a run must fail with a message matching `message`. Records the figures. */
async function expectFailedRun(input: string, files: Record<string, Buffer | string>, message: RegExp) {
  resetPeakRss(worker.child.pid!);
  const started = performance.now();
  const res = await submitUpload(hostile.agent, hostile.block.id, files);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const run = await waitForRun(hostile.agent, res.body.run.id, undefined, { timeoutMs: BOUNDS.elapsedMs + 30_000, describe: worker.output });
  const elapsedMs = performance.now() - started;
  const peak = peakRss(worker.child.pid!);
  figures.push({ input, outcome: `run ${run.state}`, message: (run.error ?? '').split('\n').slice(0, 2).join(' '), elapsedMs, workerPeakMiB: peak / MiB });
  expect(run.state, run.error ?? '').toBe('failed');
  expect(run.error).toMatch(message);
  // A failed run keeps no findings (the worker writes them only for a finished check).
  expect(await storedFindings(env, run.id)).toHaveLength(0);
  expect(elapsedMs).toBeLessThan(BOUNDS.elapsedMs);
  expect(peak).toBeLessThan(BOUNDS.workerPeakBytes);
  return { run, upload: res.body.upload as { diagnostics: { code: string; line: number; column: number }[] } };
}

/** Submit through the API; the upload must be refused with this status, code and message. */
async function expectRefusedUpload(input: string, files: Record<string, Buffer | string>, status: number, code: string, message: RegExp) {
  const started = performance.now();
  const res = await submitUpload(hostile.agent, hostile.block.id, files);
  const elapsedMs = performance.now() - started;
  figures.push({ input, outcome: `refused ${res.status}`, message: res.body?.error?.message ?? '', elapsedMs, workerPeakMiB: null });
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  expect(res.body.error.code).toBe(code);
  expect(res.body.error.message).toMatch(message);
  expect(elapsedMs).toBeLessThan(BOUNDS.elapsedMs);
}

function reference(files: Record<string, string>) {
  const deck = defaultDeck();
  return checkDesign(readDesign(files, { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies }), deck).findings;
}

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
  worker = startWorker(env);
  await worker.ready;
  hostile = await teamWithBlock();
  bystander = await teamWithBlock();

  // The other team's first run, finished before the corpus starts: its findings are what the probes read.
  const first = nandBlock(12, (i) => i % 4 === 0, 'lby');
  const res = await submitUpload(bystander.agent, bystander.block.id, { 'bystander.sp': first }).expect(201);
  expect((await waitForRun(bystander.agent, res.body.run.id)).state).toBe('succeeded');
  probes = startProbes(serverUrl(env.server), await cookieOf(bystander.email, bystander.password), res.body.run.id);

  // Its second run is queued now, among the hostile ones, and must come out right.
  bystanderText = nandBlock(40, (i) => i % 5 === 0, 'lbz');
  bystanderRun = (await submitUpload(bystander.agent, bystander.block.id, { 'bystander2.sp': bystanderText }).expect(201)).body.run.id;
});

afterAll(async () => {
  await probes?.stop();
  await worker?.stop();
  await env?.close();
  if (figures.length) {
    const dir = path.join(repoRoot, 'test-artifacts', 'hostile');
    fs.mkdirSync(dir, { recursive: true });
    fs.writeFileSync(path.join(dir, 'figures.json'), JSON.stringify(figures, null, 2));
    console.log(
      ['input | outcome | elapsed | worker peak', ...figures.map((f) => `${f.input} | ${f.outcome} | ${(f.elapsedMs / 1000).toFixed(1)} s | ${f.workerPeakMiB === null ? '–' : `${f.workerPeakMiB.toFixed(0)} MiB`}`)].join('\n'),
    );
  }
});

describe('hostile netlists through the upload API and a worker', () => {
  it('an empty file fails: nothing was checked, so nothing may look clean', async () => {
    await expectFailedRun('empty file', { 'empty.sp': '' }, /empty\.sp:1:1: .*no device/);
  });

  it('binary junk fails with the reader\'s first problems and a count of the rest', async () => {
    const { run } = await expectFailedRun('binary junk (256 KiB)', { 'junk.sp': junkBytes(256 * 1024) }, /could not be read:\njunk\.sp:\d+:\d+: /);
    // formatDiagnostics (server/worker/jobs.ts) lists at most 50 errors and counts the others.
    expect(run.error).toMatch(/… and \d+ more$/);
  });

  it('a line of a megabyte fails on what the line says, not on its length', async () => {
    const text = `* Lantern hostile: one instance line of a megabyte\n${INVERTER}x1 ${'n '.repeat(600_000)}linv\n`;
    expect(Buffer.byteLength(text)).toBeGreaterThan(MiB);
    // SPICE: an X line names one node per port of its subcircuit (ngspice manual, "Subcircuit Calls").
    await expectFailedRun('a 1 MB line', { 'wide.sp': text }, /wide\.sp:6:1: x1 connects 600000 nodes to linv, which has 4 ports/);
  });

  it('ten thousand continuation lines are joined and judged as one statement', async () => {
    // A line starting with + continues the previous one (SPICE convention).
    const text = `* Lantern hostile: ten thousand continuations\n${INVERTER}x1 a\n${'+ n\n'.repeat(10_000)}+ linv\n`;
    await expectFailedRun('10 000 continuation lines', { 'cont.sp': text }, /cont\.sp:6:1: x1 connects 10001 nodes to linv/);
  });

  it('a hierarchy thousands of levels deep fails with the depth it reached', async () => {
    await expectFailedRun('hierarchy 5 000 levels deep', { 'deep.sp': deepHierarchy(5000) }, /deep\.sp:\d+:\d+: .*levels deep/);
  });

  it('an exponentially fanning hierarchy fails once it can no longer be counted exactly', async () => {
    // 2^64 inverters: beyond 2^53, the largest integer a double holds exactly (IEEE 754 binary64).
    await expectFailedRun('hierarchy fanning to 2^64 cells', { 'fan.sp': fanningHierarchy(64) }, /fan\.sp:\d+:\d+: .*more .*than can be counted exactly/);
  });

  it('just inside those two bounds, the same shapes are checked', async () => {
    for (const [input, text] of [
      ['hierarchy 256 levels deep', deepHierarchy(256)],
      ['hierarchy fanning to 2^52 cells', fanningHierarchy(52)],
    ] as const) {
      resetPeakRss(worker.child.pid!);
      const started = performance.now();
      const res = await submitUpload(hostile.agent, hostile.block.id, { 'bound.sp': text }).expect(201);
      const run = await waitForRun(hostile.agent, res.body.run.id, undefined, { timeoutMs: BOUNDS.elapsedMs });
      figures.push({ input, outcome: `run ${run.state}`, message: `${run.summary?.cells} cells`, elapsedMs: performance.now() - started, workerPeakMiB: peakRss(worker.child.pid!) / MiB });
      expect(run.state, run.error ?? '').toBe('succeeded');
      expect(run.summary?.cells).toBe(text.match(/^\.subckt/gm)!.length);
    }
  });

  it('a NUL inside a device name is read as U+FFFD, so the finding quoting it can be stored', async () => {
    // NUL is valid UTF-8 (RFC 3629) but PostgreSQL text cannot hold it (PostgreSQL manual, "Character Types").
    const text = `* Lantern hostile: a NUL in a name\n.subckt lnul a y vdd vss\nmp\0x y a vdd vdd pch w=1u l=0.25u\nmn y a vss vss nch w=2000u l=0.25u\n.ends\n`;
    resetPeakRss(worker.child.pid!);
    const started = performance.now();
    const res = await submitUpload(hostile.agent, hostile.block.id, { 'nul.sp': text }).expect(201);
    expect(res.body.upload.diagnostics).toEqual([expect.objectContaining({ code: 'invalid-utf8', line: 3, column: 3 })]);
    const run = await waitForRun(hostile.agent, res.body.run.id);
    figures.push({ input: 'NUL in a device name', outcome: `run ${run.state}`, message: res.body.upload.diagnostics[0].message, elapsedMs: performance.now() - started, workerPeakMiB: peakRss(worker.child.pid!) / MiB });
    expect(run.state, run.error ?? '').toBe('succeeded');
    // The 2 mm pull-down is past the built-in deck's size limit (nandBlock's construction in runs-helpers.ts): one finding, stored.
    const stored = await storedFindings(env, run.id);
    expect(stored.map((f) => f.rule_id)).toContain('device.implausible-size');
    expect(stored.length).toBe(reference({ 'nul.sp': text.replace('\0', '\uFFFD') }).length);
  });

  it('recursive instantiation fails naming the cycle', async () => {
    // SPICE: a subcircuit may call others but never itself, directly or not (ngspice manual, "Subcircuits").
    const text = '* Lantern hostile: two cells inside each other\n.subckt la p vdd vss\nx1 p vdd vss lb\n.ends\n.subckt lb p vdd vss\nx1 p vdd vss la\n.ends\n';
    await expectFailedRun('recursive instantiation', { 'loop.sp': text }, /loop\.sp:\d+:\d+: x1 instantiates l[ab] inside itself \(l[ab] → l[ab] → l[ab]\)/);
  });

  it('an include cycle fails naming the files in it', async () => {
    const files = { 'a.sp': '* Lantern hostile: a includes b\n.include "b.inc"\n', 'b.inc': `.include "a.sp"\n${INVERTER}` };
    await expectFailedRun('include cycle', files, /already being read \(a\.sp → b\.inc → a\.sp\)/);
  });

  it('an include that climbs out of the upload is refused and reads nothing of the machine', async () => {
    const files = { 'climb.sp': `* Lantern hostile: reach for the host's files\n.include ../../etc/passwd\n.include "/etc/passwd"\n${INVERTER}` };
    const { run } = await expectFailedRun('.include ../../etc/passwd', files, /climb\.sp:2:\d+: .*leaves the set of uploaded files/);
    expect(run.error).toMatch(/climb\.sp:3:\d+: .*"\/etc\/passwd" leaves the set of uploaded files/);
    // passwd(5) lines start with the root account: none of it may appear anywhere in what the run stored.
    const detail = await hostile.agent.get(`/api/runs/${run.id}`).expect(200);
    expect(JSON.stringify(detail.body)).not.toMatch(/root:x?:0:0/);
    expect((await hostile.agent.get(`/api/runs/${run.id}/files`).expect(200)).body.items.map((f: { path: string }) => f.path)).toEqual(['climb.sp']);
  });

  it('invalid UTF-8 with nothing readable fails, and says where the bad bytes start', async () => {
    // 0xFF and 0xFE never occur in UTF-8 (RFC 3629 §1): every byte becomes U+FFFD.
    const bytes = Buffer.concat([Buffer.from('* Lantern hostile: not text\n'), Buffer.from([0xff, 0xfe, 0xc0, 0xaf, 0x80, 0x20, 0xff, 0x0a])]);
    const { upload } = await expectFailedRun('invalid UTF-8', { 'bytes.sp': bytes }, /bytes\.sp:2:1: /);
    expect(upload.diagnostics).toEqual([expect.objectContaining({ code: 'invalid-utf8', line: 2, column: 1 })]);
  });

  it('numbers beyond the double range, and NaN, fail where they are written', async () => {
    // 1e999 overflows binary64 to infinity (IEEE 754 §7.4); no device is infinitely wide.
    const huge = `* Lantern hostile: an infinite width\n.subckt lhuge a y vdd vss\nmp y a vdd vdd pch w=1e999 l=0.25u\nmn y a vss vss nch w=0.5u l=0.25u\n.ends\n`;
    await expectFailedRun('w=1e999', { 'huge.sp': huge }, /huge\.sp:3:\d+: number "1e999" is not finite/);
    // NaN is not a SPICE number: read as a parameter name, it names none.
    const nan = huge.replace('w=1e999', 'w=NaN').replace('an infinite width', 'a width of NaN');
    await expectFailedRun('w=NaN', { 'nan.sp': nan }, /nan\.sp:3:\d+: unknown parameter "NaN"/);
    const zeroByZero = huge.replace('an infinite width', 'a width of 0/0\n.param k={0/0}').replace('w=1e999', 'w={k}');
    await expectFailedRun('w={0/0}', { 'zero.sp': zeroByZero }, /zero\.sp:2:\d+: expression evaluates to NaN/);
  });

  it('a zip bomb is refused while it inflates', async () => {
    // 320 MiB of one byte deflates about a thousand to one (RFC 1951 back-references); the limit per file is 64 MiB.
    const bomb = await zipOf([{ name: 'bomb.sp', content: repeatedStream(320 * MiB) }]);
    expect(bomb.length).toBeLessThan(1 * MiB);
    await expectRefusedUpload('zip bomb (320 MiB in < 1 MiB)', { 'bomb.zip': bomb }, 413, 'payload-too-large', /bomb\.sp unpacks to more than 64 MiB/);
  });

  it('archive members that climb out of the bundle are refused', async () => {
    const zip = renamedMember(await zipOf([{ name: 'ok.sp', content: Buffer.from(`* ok\n${INVERTER}`) }, { name: 'QQ/QQ/etc/x.sp', content: Buffer.from(INVERTER) }]), 'QQ/QQ', '../..');
    await expectRefusedUpload('zip member ../../etc/x.sp', { 'climb.zip': zip }, 400, 'unsafe-archive', /climb\.zip: member "\.\.\/\.\.\/etc\/x\.sp" climbs out/);
    await expectRefusedUpload('tar member ../escape.sp', { 'climb.tar': await climbingTar() }, 400, 'unsafe-archive', /climbs out of the bundle/);
  });
});

describe('a 200 MB upload, streamed', () => {
  it('is refused once a file passes the limit per file, long before it has all arrived', async () => {
    const cookie = await cookieOf(hostile.email, hostile.password);
    const started = performance.now();
    const answer = await streamUpload(serverUrl(env.server), cookie, hostile.block.id, [{ name: 'huge.sp', bytes: 200 * 1000 * 1000 }]);
    const elapsedMs = performance.now() - started;
    figures.push({ input: '200 MB in one file (chunked)', outcome: `refused ${answer.status}`, message: answer.body.error?.message ?? '', elapsedMs, workerPeakMiB: null });
    // RFC 9110 §15.5.14: 413 Content Too Large.
    expect(answer.status).toBe(413);
    expect(answer.body.error?.message).toMatch(/larger than 64 MiB, the limit per file/);
    // The answer came when about 64 MiB had been read (plus what sockets buffer), not after 200 MB.
    expect(answer.sentWhenAnswered).toBeLessThan(64 * MiB + 16 * MiB);
    expect(elapsedMs).toBeLessThan(BOUNDS.elapsedMs);
  });

  it('is refused once the upload passes the limit in all, even when each file is small', async () => {
    const limited = await env.serverWith({ KEEPWELL_LOGIN_MAX_PER_IP: '1000', KEEPWELL_UPLOAD_MAX_TOTAL_BYTES: String(48 * MiB) });
    const cookie = await cookieOf(hostile.email, hostile.password);
    const files = Array.from({ length: 20 }, (_, i) => ({ name: `part${i}.sp`, bytes: 10 * 1000 * 1000 }));
    const started = performance.now();
    const answer = await streamUpload(serverUrl(limited), cookie, hostile.block.id, files);
    const elapsedMs = performance.now() - started;
    figures.push({ input: '200 MB in 20 files (chunked)', outcome: `refused ${answer.status}`, message: answer.body.error?.message ?? '', elapsedMs, workerPeakMiB: null });
    expect(answer.status).toBe(413);
    expect(answer.body.error?.message).toMatch(/more than 48 MiB, the limit per upload/);
    expect(answer.sentWhenAnswered).toBeLessThan(48 * MiB + 16 * MiB);
  });
});

describe('meanwhile', () => {
  it('the other team was answered promptly throughout, and its run came out right', async () => {
    const run = await waitForRun(bystander.agent, bystanderRun, undefined, { timeoutMs: 120_000 });
    expect(run.state, run.error ?? '').toBe('succeeded');
    const stored = await storedFindings(env, bystanderRun);
    expect(stored.map((f) => f.fingerprint).sort()).toEqual(reference({ 'bystander2.sp': bystanderText }).map((f) => f.fingerprint).sort());

    const answered = await probes.stop();
    const worst = (what: string) => Math.max(...answered.filter((p) => p.what === what).map((p) => p.ms));
    figures.push({ input: `probes while hostile (${answered.length} requests)`, outcome: 'answered', message: `slowest health ${worst('health').toFixed(0)} ms, slowest findings page ${worst('findings').toFixed(0)} ms`, elapsedMs: 0, workerPeakMiB: null });
    expect(answered.length).toBeGreaterThan(20);
    expect(answered.every((p) => p.status === 200)).toBe(true);
    expect(worst('health')).toBeLessThan(BOUNDS.probeMs);
    expect(worst('findings')).toBeLessThan(BOUNDS.probeMs);
  });
});
