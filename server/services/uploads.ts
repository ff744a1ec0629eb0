// Netlist uploads: the files of one upload (loose netlists and unpacked bundles)
// checked against the limits, hashed, and stored in PostgreSQL as one netlist set
// of a block. An identical set (same paths, same bytes) already stored for the
// block is reused, not stored again.

import crypto from 'node:crypto';
import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { ARCHIVE_EXTENSIONS, NETLIST_EXTENSIONS, type NetlistView, type RunDiagnostic, type UploadResult } from '../../shared/api/runs';
import type { AppContext } from '../context';
import { Netlist, NetlistFile } from '../db/models';
import { HttpError, notFound } from '../errors';
import { recordAudit } from './audit';
import { getBlock } from './blocks';
import { UploadBudget, formatBytes, safeMemberPath, tooLarge, unpackTar, unpackZip, type UnpackedFile, type UploadLimits } from './uploads-archive';
import { decodeNetlistText } from './uploads-text';

export { formatBytes, type UploadLimits } from './uploads-archive';

/** What multer hands over for each file part. */
export interface IncomingFile {
  originalname: string;
  buffer: Buffer;
}

type Kind = 'netlist' | 'zip' | 'tar' | 'tar.gz';

function kindOf(name: string): Kind | null {
  const lower = name.toLowerCase();
  if (lower.endsWith('.tar.gz') || lower.endsWith('.tgz')) return 'tar.gz';
  if (lower.endsWith('.tar')) return 'tar';
  if (lower.endsWith('.zip')) return 'zip';
  return NETLIST_EXTENSIONS.some((ext) => lower.endsWith(ext)) ? 'netlist' : null;
}

const ACCEPTED = [...NETLIST_EXTENSIONS, ...ARCHIVE_EXTENSIONS].join(' ');

export interface CollectedFiles {
  files: UnpackedFile[];
  ignored: { path: string; reason: string }[];
}

/** Every netlist of an upload, loose or from bundles, in path order. Throws 400/413 naming the offending part. */
export async function collectNetlistFiles(incoming: IncomingFile[], limits: UploadLimits): Promise<CollectedFiles> {
  if (incoming.length === 0) throw new HttpError(400, 'validation', 'Attach at least one netlist file (field "files").', [{ path: 'files', message: 'no file' }]);
  const budget = new UploadBudget(limits);
  const byPath = new Map<string, Buffer>();
  const ignored: CollectedFiles['ignored'] = [];
  const add = (path: string, content: Buffer, from: string) => {
    if (byPath.has(path)) throw new HttpError(400, 'duplicate-path', `Two files of the upload have the path ${path} (${from}).`);
    byPath.set(path, content);
  };

  for (const file of incoming) {
    const name = file.originalname;
    const kind = kindOf(name);
    if (!kind) {
      throw new HttpError(400, 'unsupported-file', `${name} is neither a netlist nor a bundle; accepted endings: ${ACCEPTED}.`, [
        { path: 'files', message: `${name}: unsupported file type` },
      ]);
    }
    if (kind === 'netlist') {
      const path = safeMemberPath(name, 'upload');
      if (path === null) throw new HttpError(400, 'unsupported-file', `"${name}" is not a file name.`);
      budget.addFile(path);
      budget.addBytes(path, file.buffer.length, file.buffer.length);
      add(path, file.buffer, name);
      continue;
    }
    const onMember = (path: string, content: Buffer) => {
      if (kindOf(path) !== 'netlist') {
        ignored.push({ path, reason: `not a netlist (accepted endings inside a bundle: ${NETLIST_EXTENSIONS.join(' ')})` });
        return;
      }
      add(path, content, name);
    };
    if (kind === 'zip') await unpackZip(name, file.buffer, budget, onMember);
    else await unpackTar(name, file.buffer, kind === 'tar.gz', budget, onMember);
  }
  if (byPath.size === 0) throw new HttpError(400, 'validation', 'The upload holds no netlist file.', [{ path: 'files', message: 'no netlist' }]);
  const files = [...byPath].map(([path, content]) => ({ path, content })).sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
  return { files, ignored };
}

export const sha256 = (bytes: Uint8Array | string) => crypto.createHash('sha256').update(bytes).digest('hex');

/** The identity of a file set: SHA-256 over its sorted `sha256  path` lines (the layout of sha256sum's output). */
export function contentHashOf(files: { path: string; sha256: string }[]): string {
  const lines = files.map((f) => `${f.sha256}  ${f.path}\n`).sort();
  return sha256(lines.join(''));
}

export function decodeDiagnostics(files: UnpackedFile[]): RunDiagnostic[] {
  return files.flatMap((f) => decodeNetlistText(f.path, f.content).diagnostic ?? []);
}

export async function netlistView(netlist: Netlist, transaction?: Transaction): Promise<NetlistView> {
  const files = await NetlistFile.findAll({ where: { netlistId: netlist.id }, order: [['path', 'ASC']], transaction });
  return {
    id: netlist.id,
    blockId: netlist.blockId,
    contentHash: netlist.contentHash ?? '',
    fileCount: netlist.fileCount,
    totalBytes: netlist.totalBytes,
    files: files.map((f) => ({ path: f.path, size: f.size, sha256: f.sha256 })),
    createdAt: netlist.createdAt.toISOString(),
  };
}

/** Store (or find) the netlist set of an upload for a block of the actor's team. */
export async function storeUpload(
  ctx: Pick<AppContext, 'sequelize'> & { config: Pick<AppContext['config'], 'upload'> },
  actor: { id: string; teamId: string },
  blockId: string,
  incoming: IncomingFile[],
): Promise<UploadResult & { netlistId: string }> {
  await getBlock(actor.teamId, blockId);
  const { files, ignored } = await collectNetlistFiles(incoming, ctx.config.upload);
  const hashed = files.map((f) => ({ ...f, sha256: sha256(f.content) }));
  const contentHash = contentHashOf(hashed);
  const diagnostics = decodeDiagnostics(files);

  const find = (transaction?: Transaction) => Netlist.findOne({ where: { teamId: actor.teamId, blockId, contentHash }, transaction });
  const existing = await find();
  if (existing) return { netlist: await netlistView(existing), netlistId: existing.id, reused: true, ignored, diagnostics };

  try {
    return await ctx.sequelize.transaction(async (transaction) => {
      const totalBytes = hashed.reduce((n, f) => n + f.content.length, 0);
      const netlist = await Netlist.create(
        { teamId: actor.teamId, blockId, uploadedBy: actor.id, fileCount: hashed.length, totalBytes, contentHash },
        { transaction },
      );
      // One row at a time keeps a single statement far below PostgreSQL's 1 GB message limit whatever the set holds.
      for (const f of hashed) {
        await NetlistFile.create({ netlistId: netlist.id, path: f.path, sha256: f.sha256, size: f.content.length, content: f.content }, { transaction });
      }
      await recordAudit(
        {
          teamId: actor.teamId,
          actorId: actor.id,
          action: 'netlist.upload',
          subjectType: 'netlist',
          subjectId: netlist.id,
          detail: { blockId, files: hashed.length, bytes: totalBytes, contentHash },
        },
        transaction,
      );
      return { netlist: await netlistView(netlist, transaction), netlistId: netlist.id, reused: false, ignored, diagnostics };
    });
  } catch (err) {
    // The same set uploaded twice at once: the other upload stored it first.
    if (err instanceof UniqueConstraintError) {
      const raced = await find();
      if (raced) return { netlist: await netlistView(raced), netlistId: raced.id, reused: true, ignored, diagnostics };
    }
    throw err;
  }
}

export async function getNetlist(teamId: string, id: string): Promise<Netlist> {
  const netlist = await Netlist.findOne({ where: { id, teamId } });
  if (!netlist) throw notFound('Netlist');
  return netlist;
}

/** The stored bytes of a netlist set, path → bytes (what the worker reads and the deck preview may reuse). */
export async function loadNetlistBytes(ctx: Pick<AppContext, 'sequelize'>, netlistId: string): Promise<{ path: string; content: Buffer }[]> {
  return ctx.sequelize.query<{ path: string; content: Buffer }>(
    'select path, content from netlist_files where netlist_id = :netlistId order by path',
    { replacements: { netlistId }, type: QueryTypes.SELECT },
  );
}

/** Refuse a request body over the upload's total limit before reading it (the parts are counted again as they arrive). */
export function checkDeclaredLength(contentLength: string | undefined, limits: UploadLimits): void {
  const declared = Number(contentLength ?? NaN);
  // Multipart framing adds a few hundred bytes per part.
  const allowance = limits.maxTotalBytes + 1024 * (limits.maxFiles + 16);
  if (Number.isFinite(declared) && declared > allowance) {
    throw tooLarge(`The upload is ${formatBytes(declared)}; at most ${formatBytes(limits.maxTotalBytes)} may be sent at once (KEEPWELL_UPLOAD_MAX_TOTAL_BYTES).`);
  }
}
