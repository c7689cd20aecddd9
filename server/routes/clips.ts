/**
 * Clips: a multipart upload streamed to a temporary file while it is hashed and its content
 * sniffed (never trusted from the name or the declared type), the size and duration limits
 * enforced while it streams; then the header checked, and only then the file renamed to its hash
 * and the row written. List, read, delete (with everything made from the clip), download.
 */
import { createReadStream } from 'node:fs';
import { join } from 'node:path';
import multipart from '@fastify/multipart';
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { Type } from 'typebox';
import { ClipListSchema, ClipSchema, IdParams, problems } from '../../shared/schemas/api.ts';
import { HttpError, notFound } from '../plugins/errors.ts';
import { SNIFF_BYTES, probeAudioFile, streamingCheck } from '../services/probe.ts';
import { commitFile, removeQuietly, streamToFile, tempPath } from '../storage/files.ts';

const MIME: Record<string, string> = { wav: 'audio/wav', flac: 'audio/flac', ogg: 'audio/ogg', mp3: 'audio/mpeg' };

/** A name fit to show and to put in a Content-Disposition header: the last path part, printable, at most 200 characters. */
export function cleanName(raw: string | undefined, fallback = 'clip'): string {
  const base = (raw ?? '').split(/[\\/]/).pop() ?? '';
  const clean = base.replace(/[\u0000-\u001f\u007f"]/g, '').trim().slice(0, 200);
  return clean || fallback;
}

/** Content-Disposition for a download: an ASCII fallback and the UTF-8 name (RFC 6266). */
export const attachment = (name: string): string =>
  `attachment; filename="${name.replace(/[^\x20-\x7e]/g, '_').replace(/["\\]/g, '_')}"; filename*=UTF-8''${encodeURIComponent(name)}`;

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { config, store, paths } = app;
  await app.register(multipart, { limits: { fileSize: config.maxUploadBytes + 1, files: 1, fields: 8, parts: 9, fieldSize: 1024, headerPairs: 50 } });

  app.post(
    '/clips',
    {
      schema: {
        summary: 'Upload a clip (multipart/form-data, one file in the field "file")',
        consumes: ['multipart/form-data'],
        response: { 200: ClipSchema, 201: ClipSchema, ...problems(400, 413, 415) },
      },
    },
    async (req, reply) => {
      if (!req.isMultipart()) throw new HttpError(415, 'not-multipart', 'upload the file as multipart/form-data with one field "file"', 'file');
      const tmp = tempPath(paths);
      let landed: { sha256: string; sizeBytes: number } | null = null;
      let name = 'clip';
      try {
        for await (const part of req.parts()) {
          if (part.type !== 'file') continue;
          if (landed) throw new HttpError(400, 'one-file', 'send exactly one file per upload, in the field "file"', 'file');
          if (part.fieldname !== 'file') throw new HttpError(400, 'bad-field', `the file came in the field "${part.fieldname.slice(0, 40)}"; send it in the field "file"`, 'file');
          name = cleanName(part.filename);
          const tooLarge = () => new HttpError(413, 'too-large', `the file is larger than the ${(config.maxUploadBytes / 1e6).toFixed(0)} MB upload limit; cut a shorter excerpt or use a compressed format (FLAC, Ogg Vorbis, MP3)`, 'file');
          const r = await streamToFile(part.file, tmp, { maxBytes: config.maxUploadBytes, headBytes: SNIFF_BYTES, onTooLarge: tooLarge, inspect: streamingCheck(config.maxDurationS) });
          if (part.file.truncated) throw tooLarge();
          landed = r;
        }
        if (!landed) throw new HttpError(400, 'no-file', 'the upload holds no file; send one file in the multipart field "file"', 'file');
        const facts = await probeAudioFile(tmp, landed.sizeBytes, config.maxDurationS);
        const existing = store.clipBySha(landed.sha256);
        if (existing) return reply.code(200).send(existing);
        const final = join(paths.clips, landed.sha256);
        await commitFile(tmp, final); // the file under its final name first, then the row
        try {
          const clip = store.insertClip({ name, sha256: landed.sha256, sizeBytes: landed.sizeBytes, ...facts });
          return reply.code(201).send(clip);
        } catch (e) {
          const again = store.clipBySha(landed.sha256); // the same bytes uploaded at the same moment
          if (again) return reply.code(200).send(again);
          throw e;
        }
      } finally {
        await removeQuietly(tmp);
      }
    },
  );

  app.get('/clips', { schema: { response: { 200: ClipListSchema } } }, async () => ({ items: store.listClips() }));

  app.get('/clips/:id', { schema: { params: IdParams, response: { 200: ClipSchema, ...problems(404) } } }, async (req) => {
    const clip = store.getClip(req.params.id);
    if (!clip) throw notFound('clip', req.params.id);
    return clip;
  });

  app.delete('/clips/:id', { schema: { params: IdParams, summary: 'Delete a clip with its analyses, plans, renders and set entries', response: { 204: Type.Null(), ...problems(404) } } }, async (req, reply) => {
    const files = store.deleteClip(req.params.id);
    if (!files) throw notFound('clip', req.params.id);
    // Rows are gone; now the files (a crash here leaves only files the next start sweeps).
    for (const f of files.clips) await removeQuietly(join(paths.clips, f));
    for (const f of files.analyses) await removeQuietly(join(paths.analyses, f));
    for (const f of files.renders) await removeQuietly(join(paths.renders, f));
    return reply.code(204).send(null);
  });

  app.get('/clips/:id/audio', { schema: { params: IdParams, summary: 'The original bytes', response: { 200: Type.Unknown(), ...problems(404) } } }, async (req, reply) => {
    const clip = store.getClip(req.params.id);
    if (!clip) throw notFound('clip', req.params.id);
    return reply
      .type(MIME[clip.format] ?? 'application/octet-stream')
      .header('content-length', clip.sizeBytes)
      .header('content-disposition', attachment(clip.name))
      .send(createReadStream(join(paths.clips, clip.sha256)));
  });
};

export default routes;
