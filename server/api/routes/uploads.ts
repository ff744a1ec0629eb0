// /api/uploads: netlist sets stored for a block (loose files and .zip/.tar.gz bundles,
// multipart field `files`). The multipart reader is shared with POST /api/runs.

import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { idParamSchema } from '../../../shared/api/common';
import { uploadFieldsSchema } from '../../../shared/api/runs';
import type { Config } from '../../config';
import type { AppContext } from '../../context';
import { HttpError } from '../../errors';
import { checkDeclaredLength, formatBytes, getNetlist, netlistView, storeUpload, type IncomingFile } from '../../services/uploads';
import { tooLarge } from '../../services/uploads-archive';
import { parseRequest } from '../http';
import { requirePermission, signedIn, teamIdOf } from '../middleware/auth';

/** The multipart limits turned into the API's 413/400 errors, each naming its limit. */
function uploadError(err: unknown, limits: Config['upload']): unknown {
  if (!(err instanceof multer.MulterError)) return err;
  switch (err.code) {
    case 'LIMIT_FILE_COUNT':
    case 'LIMIT_PART_COUNT':
      return new HttpError(413, 'payload-too-large', `An upload may hold at most ${limits.maxFiles} files (KEEPWELL_UPLOAD_MAX_FILES).`);
    case 'LIMIT_UNEXPECTED_FILE':
      return new HttpError(400, 'validation', `Files go in the multipart field "files" (got "${err.field}"), at most ${limits.maxFiles} of them.`, [
        { path: err.field ?? 'files', message: 'unexpected file field' },
      ]);
    default:
      return new HttpError(400, 'validation', `The multipart body could not be read: ${err.message}.`);
  }
}

/** Per request: how to refuse it at once, set by netlistMultipart for the storage below. */
const refuseNow = new WeakMap<object, (err: HttpError) => void>();

/**
 * multer's memory storage, counting each file's bytes and the upload's total as they arrive.
 * (multer has no limit in all, so every file under the limit per file was held until the body
 * ended; and it answers a limit only once the whole body has been read.) Past a limit the file
 * is dropped, the rest of the body is read and discarded, and the request is refused at once.
 */
function countedMemoryStorage(limits: Config['upload']): multer.StorageEngine {
  const received = new WeakMap<object, number>();
  return {
    _handleFile(req, file, callback) {
      const chunks: Buffer[] = [];
      let size = 0;
      let refused = false;
      const onData = (chunk: Buffer) => {
        size += chunk.length;
        const total = (received.get(req) ?? 0) + chunk.length;
        received.set(req, total);
        const over =
          size > limits.maxFileBytes
            ? tooLarge(`${file.originalname} is larger than ${formatBytes(limits.maxFileBytes)}, the limit per file (KEEPWELL_UPLOAD_MAX_FILE_BYTES).`)
            : total > limits.maxTotalBytes
              ? tooLarge(`The upload holds more than ${formatBytes(limits.maxTotalBytes)}, the limit per upload (KEEPWELL_UPLOAD_MAX_TOTAL_BYTES).`)
              : null;
        if (!over) return void chunks.push(chunk);
        refused = true;
        chunks.length = 0;
        file.stream.off('data', onData);
        file.stream.resume();
        refuseNow.get(req)?.(over);
        callback(over);
      };
      file.stream.on('data', onData);
      file.stream.on('end', () => {
        if (refused) return;
        const buffer = Buffer.concat(chunks);
        callback(null, { buffer, size: buffer.length });
      });
    },
    _removeFile(_req, file, callback) {
      delete (file as { buffer?: Buffer }).buffer;
      callback(null);
    },
  };
}

/** Reads a multipart body into memory within the configured limits; other content types pass through untouched. */
export function netlistMultipart(config: Config): RequestHandler {
  const { upload } = config;
  const parse = multer({
    storage: countedMemoryStorage(upload),
    limits: { files: upload.maxFiles, fields: 20, fieldSize: 64 * 1024, parts: upload.maxFiles + 20 },
    defParamCharset: 'utf8',
  }).array('files', upload.maxFiles);
  return (req, res, next) => {
    if (!req.is('multipart/form-data')) return next();
    checkDeclaredLength(req.headers['content-length'], upload);
    // Answered once: at the first limit passed (the storage), or when multer is done with the body.
    let answered = false;
    const answer = (err?: unknown) => {
      if (answered) return;
      answered = true;
      refuseNow.delete(req);
      next(err);
    };
    refuseNow.set(req, answer);
    parse(req, res, (err?: unknown) => answer(err ? uploadError(err, upload) : undefined));
  };
}

export function uploadedFiles(req: Express.Request): IncomingFile[] {
  return Array.isArray(req.files) ? req.files.map((f) => ({ originalname: f.originalname, buffer: f.buffer })) : [];
}

export function uploadRoutes(ctx: AppContext): Router {
  const router = Router();

  router.post('/', requirePermission('run.submit'), netlistMultipart(ctx.config), async (req, res) => {
    if (!req.is('multipart/form-data')) throw new HttpError(415, 'unsupported-media-type', 'Send the files as multipart/form-data (field "files").');
    const { body } = parseRequest(req, { body: uploadFieldsSchema });
    const result = await storeUpload(ctx, { id: signedIn(req).user.id, teamId: teamIdOf(req) }, body.blockId, uploadedFiles(req));
    const { netlistId: _, ...view } = result;
    res.status(result.reused ? 200 : 201).json(view);
  });

  router.get('/:id', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await netlistView(await getNetlist(teamIdOf(req), params.id)));
  });

  return router;
}
