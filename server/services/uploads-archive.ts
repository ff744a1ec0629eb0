// Unpacking an uploaded bundle (.zip, .tar.gz/.tgz, .tar) into netlist files, safely.
//
// Refused outright (the whole upload fails with the member named): a path that is
// absolute, names a drive, or has a `..` segment; a symbolic or hard link; any member
// that is not a regular file or a folder; an encrypted zip member. Sizes are counted
// while the bytes stream out of the decompressor, so a zip bomb is stopped at the
// stated limit, never inflated in full: per member, in all, and (for gzip) the
// decompressed tar stream itself.

import zlib from 'node:zlib';
import { Parser, type ReadEntry } from 'tar';
import yauzl from 'yauzl';
import { HttpError } from '../errors';

export interface UploadLimits {
  maxFileBytes: number;
  maxFiles: number;
  maxTotalBytes: number;
}

export interface UnpackedFile {
  path: string;
  content: Buffer;
}

/** Counts files and bytes across every part of one upload. */
export class UploadBudget {
  files = 0;
  bytes = 0;
  constructor(readonly limits: UploadLimits) {}

  addFile(path: string): void {
    this.files++;
    if (this.files > this.limits.maxFiles) {
      throw tooLarge(`An upload may hold at most ${this.limits.maxFiles} files (KEEPWELL_UPLOAD_MAX_FILES); ${path} is one too many.`);
    }
  }

  /** Count `n` more bytes of `path` (whose running size is `fileBytes`). */
  addBytes(path: string, fileBytes: number, n: number): void {
    this.bytes += n;
    if (fileBytes > this.limits.maxFileBytes) {
      throw tooLarge(`${path} unpacks to more than ${formatBytes(this.limits.maxFileBytes)}, the limit per file (KEEPWELL_UPLOAD_MAX_FILE_BYTES).`);
    }
    if (this.bytes > this.limits.maxTotalBytes) {
      throw tooLarge(`The upload unpacks to more than ${formatBytes(this.limits.maxTotalBytes)}, the limit per upload (KEEPWELL_UPLOAD_MAX_TOTAL_BYTES).`);
    }
  }
}

export function tooLarge(message: string): HttpError {
  return new HttpError(413, 'payload-too-large', message);
}

function refused(message: string): HttpError {
  return new HttpError(400, 'unsafe-archive', message);
}

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024 && n % (1024 * 1024) === 0) return `${n / (1024 * 1024)} MiB`;
  if (n >= 1024 && n % 1024 === 0) return `${n / 1024} KiB`;
  return `${n} bytes`;
}

/**
 * A member path made safe to store: forward slashes, no `.` segments. Null for a
 * folder. Throws for anything that could point outside the bundle.
 */
export function safeMemberPath(raw: string, where: string): string | null {
  if (raw.includes('\0')) throw refused(`${where}: a member name contains a NUL byte.`);
  const p = raw.replace(/\\/g, '/');
  if (p.startsWith('/') || /^[A-Za-z]:/.test(p) || p.startsWith('~')) throw refused(`${where}: member "${raw}" has an absolute path.`);
  const segments = p.split('/').filter((s) => s !== '' && s !== '.');
  if (segments.includes('..')) throw refused(`${where}: member "${raw}" climbs out of the bundle with "..".`);
  if (segments.length === 0 || p.endsWith('/')) return null;
  return segments.join('/');
}

export type MemberHandler = (path: string, content: Buffer) => void;

// ---------------------------------------------------------------- zip

const S_IFMT = 0o170000;
const S_IFREG = 0o100000;
const S_IFDIR = 0o040000;
const S_IFLNK = 0o120000;

function openZip(buffer: Buffer): Promise<yauzl.ZipFile> {
  return new Promise((resolve, reject) => {
    // Names are decoded here, not by yauzl, so that an unsafe one is refused with our message.
    yauzl.fromBuffer(buffer, { lazyEntries: true, decodeStrings: false, validateEntrySizes: true }, (err, zip) => {
      if (err || !zip) reject(new HttpError(400, 'invalid-archive', `Not a readable zip file: ${err?.message ?? 'no entries'}.`));
      else resolve(zip);
    });
  });
}

function zipEntryName(entry: yauzl.Entry): string {
  const raw = entry.fileName as unknown as Buffer;
  // Bit 11: the name is UTF-8; otherwise it is CP437, whose printable ASCII range is what netlist names use.
  return (entry.generalPurposeBitFlag & 0x800) !== 0 ? raw.toString('utf8') : raw.toString('latin1');
}

export async function unpackZip(archiveName: string, buffer: Buffer, budget: UploadBudget, onFile: MemberHandler): Promise<void> {
  const zip = await openZip(buffer);
  try {
    await new Promise<void>((resolve, reject) => {
      const fail = (err: unknown) => {
        zip.close();
        reject(err);
      };
      zip.on('error', (err: Error) => fail(new HttpError(400, 'invalid-archive', `${archiveName}: ${err.message}.`)));
      zip.on('end', () => resolve());
      zip.on('entry', (entry: yauzl.Entry) => {
        try {
          const name = zipEntryName(entry);
          const path = safeMemberPath(name, archiveName);
          const mode = (entry.externalFileAttributes >>> 16) & S_IFMT;
          if (mode === S_IFLNK) throw refused(`${archiveName}: member "${name}" is a symbolic link; bundles may hold only regular files.`);
          if (path === null || mode === S_IFDIR) {
            zip.readEntry();
            return;
          }
          if (mode !== 0 && mode !== S_IFREG) throw refused(`${archiveName}: member "${name}" is not a regular file.`);
          if (entry.generalPurposeBitFlag & 0x1) throw refused(`${archiveName}: member "${name}" is encrypted.`);
          budget.addFile(path);
          zip.openReadStream(entry, (err, stream) => {
            if (err || !stream) return fail(new HttpError(400, 'invalid-archive', `${archiveName}: ${name}: ${err?.message ?? 'unreadable'}.`));
            const chunks: Buffer[] = [];
            let size = 0;
            stream.on('data', (chunk: Buffer) => {
              size += chunk.length;
              try {
                budget.addBytes(path, size, chunk.length);
              } catch (e) {
                stream.destroy();
                fail(e);
                return;
              }
              chunks.push(chunk);
            });
            stream.on('error', (e: Error) => fail(e instanceof HttpError ? e : new HttpError(400, 'invalid-archive', `${archiveName}: ${name}: ${e.message}.`)));
            stream.on('end', () => {
              try {
                onFile(path, Buffer.concat(chunks));
                zip.readEntry();
              } catch (e) {
                fail(e);
              }
            });
          });
        } catch (e) {
          fail(e);
        }
      });
      zip.readEntry();
    });
  } finally {
    zip.close();
  }
}

// ---------------------------------------------------------------- tar

/** Decompressed bytes a tar stream may hold beyond its files' contents: a 512-byte header per member (two for long names), the end blocks and padding. */
function tarOverhead(limits: UploadLimits): number {
  return 512 * 3 * (limits.maxFiles + 1) + 20 * 512 + 512 * limits.maxFiles;
}

function gunzipCounted(archiveName: string, buffer: Buffer, limit: number): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    const gunzip = zlib.createGunzip();
    const chunks: Buffer[] = [];
    let size = 0;
    gunzip.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > limit) {
        gunzip.destroy();
        reject(tooLarge(`${archiveName} decompresses to more than ${formatBytes(limit)}, beyond what the upload limits allow (KEEPWELL_UPLOAD_MAX_TOTAL_BYTES).`));
        return;
      }
      chunks.push(chunk);
    });
    gunzip.on('error', (e) => reject(new HttpError(400, 'invalid-archive', `${archiveName} is not a readable gzip file: ${e.message}.`)));
    gunzip.on('end', () => resolve(Buffer.concat(chunks)));
    gunzip.end(buffer);
  });
}

export async function unpackTar(archiveName: string, buffer: Buffer, gzipped: boolean, budget: UploadBudget, onFile: MemberHandler): Promise<void> {
  const tarBytes = gzipped ? await gunzipCounted(archiveName, buffer, budget.limits.maxTotalBytes + tarOverhead(budget.limits)) : buffer;
  await new Promise<void>((resolve, reject) => {
    let failed = false;
    const parser = new Parser({ strict: true });
    const fail = (err: unknown) => {
      if (failed) return;
      failed = true;
      parser.abort(err instanceof Error ? err : new Error(String(err)));
      reject(err);
    };
    parser.on('error', (e: Error) => fail(e instanceof HttpError ? e : new HttpError(400, 'invalid-archive', `${archiveName} is not a readable tar file: ${e.message}.`)));
    parser.on('entry', (entry: ReadEntry) => {
      if (failed) return entry.resume();
      try {
        const path = safeMemberPath(entry.path, archiveName);
        if (entry.type === 'SymbolicLink' || entry.type === 'Link') {
          throw refused(`${archiveName}: member "${entry.path}" is a ${entry.type === 'Link' ? 'hard' : 'symbolic'} link; bundles may hold only regular files.`);
        }
        if (entry.type === 'Directory' || path === null) return entry.resume();
        if (entry.type !== 'File' && entry.type !== 'OldFile' && entry.type !== 'ContiguousFile') {
          throw refused(`${archiveName}: member "${entry.path}" is not a regular file (${entry.type}).`);
        }
        budget.addFile(path);
        const chunks: Buffer[] = [];
        let size = 0;
        entry.on('data', (chunk: Buffer) => {
          if (failed) return;
          size += chunk.length;
          try {
            budget.addBytes(path, size, chunk.length);
            chunks.push(chunk);
          } catch (e) {
            fail(e);
          }
        });
        entry.on('end', () => {
          if (failed) return;
          try {
            onFile(path, Buffer.concat(chunks));
          } catch (e) {
            fail(e);
          }
        });
      } catch (e) {
        entry.resume();
        fail(e);
      }
    });
    parser.on('end', () => {
      if (!failed) resolve();
    });
    parser.end(tarBytes);
  });
}
