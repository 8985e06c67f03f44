/**
 * Multipart uploads for App Router handlers: the Web Request body is streamed into formidable,
 * which writes each file to a temporary folder on disk (never whole files in memory) and hashes it
 * (SHA-256) on the way. Limits are checked as early as possible: the declared Content-Length before
 * reading anything, then formidable's per-file, total and count limits while streaming.
 */
import fsp from 'node:fs/promises';
import path from 'node:path';
import { Readable } from 'node:stream';
import formidable, { type File as FormidableFile } from 'formidable';
import { HttpError } from '@/lib/errors';
import { dataDir } from '@/lib/db';

/** Temporary upload folders live under the data folder, so a starting server can clear what a stopped one left (lib/jobs/start.ts). */
export function uploadTmpRoot(): string {
  return path.join(dataDir(), 'tmp', 'uploads');
}

export interface FileFieldSpec {
  maxBytes: number;
  maxCount: number;
  required?: boolean;
  label: string;
}

export interface UploadSpec {
  files: Record<string, FileFieldSpec>;
  /** Text fields accepted; anything else is ignored. */
  fields?: string[];
  maxTotalBytes: number;
}

export interface UploadedFile {
  field: string;
  tmpPath: string;
  originalName: string;
  declaredMime: string;
  sizeBytes: number;
  sha256: string;
}

export interface UploadResult {
  fields: Record<string, string>;
  files: Record<string, UploadedFile[]>;
  /** Removes whatever temporary files are still in the temporary folder. */
  cleanup(): Promise<void>;
}

const mb = (n: number) => `${Math.round(n / 1024 / 1024)} MB`;

export async function receiveUpload(req: Request, spec: UploadSpec): Promise<UploadResult> {
  const type = req.headers.get('content-type') ?? '';
  if (!type.startsWith('multipart/form-data')) throw new HttpError(415, 'Send the form as multipart/form-data (a file upload).');
  const declared = Number(req.headers.get('content-length') ?? NaN);
  // Small allowance for the multipart boundaries and text fields.
  if (Number.isFinite(declared) && declared > spec.maxTotalBytes + 1024 * 1024)
    throw new HttpError(413, `The upload is ${mb(declared)}; the limit is ${mb(spec.maxTotalBytes)} in all.`);
  if (!req.body) throw new HttpError(400, 'The upload is empty.');

  await fsp.mkdir(uploadTmpRoot(), { recursive: true });
  const tmpDir = await fsp.mkdtemp(path.join(uploadTmpRoot(), 'upload-'));
  const cleanup = () => fsp.rm(tmpDir, { recursive: true, force: true });
  const maxFileBytes = Math.max(...Object.values(spec.files).map((f) => f.maxBytes));
  const maxFiles = Object.values(spec.files).reduce((n, f) => n + f.maxCount, 0);
  const counts: Record<string, number> = {};
  let refused: HttpError | null = null;

  const form = formidable({
    uploadDir: tmpDir,
    maxFileSize: maxFileBytes,
    maxTotalFileSize: spec.maxTotalBytes,
    maxFiles,
    maxFields: 50,
    maxFieldsSize: 256 * 1024,
    hashAlgorithm: 'sha256',
    allowEmptyFiles: false,
    filter: ({ name }) => {
      const f = name ? spec.files[name] : undefined;
      if (!f || !name) return false;
      counts[name] = (counts[name] ?? 0) + 1;
      if (counts[name] > f.maxCount) {
        refused ??= new HttpError(413, `At most ${f.maxCount} file${f.maxCount > 1 ? 's' : ''} for ${f.label}.`, { [name]: `At most ${f.maxCount}.` });
        return false;
      }
      return true;
    },
  });

  // formidable lists files as they finish writing; keep the order they were sent in instead.
  const sentOrder = new Map<string, number>();
  form.on('fileBegin', (_name: string, file: FormidableFile) => sentOrder.set(file.filepath, sentOrder.size));

  // formidable reads a Node stream with headers, as from an IncomingMessage.
  const headers = Object.fromEntries(req.headers);
  // Without a length formidable assumes an empty body; a streamed body is chunked.
  if (!headers['content-length']) headers['transfer-encoding'] ??= 'chunked';
  const nodeReq = Object.assign(Readable.fromWeb(req.body as import('node:stream/web').ReadableStream), { headers });
  let parsed: [formidable.Fields, formidable.Files];
  try {
    parsed = await form.parse(nodeReq as unknown as import('node:http').IncomingMessage);
  } catch (err) {
    await cleanup();
    const e = err as { httpCode?: number; code?: number; message?: string };
    if (e.httpCode === 413) throw new HttpError(413, `The upload is over the limit (${mb(maxFileBytes)} per file, ${mb(spec.maxTotalBytes)} in all).`);
    if (e.httpCode === 400 && /empty/i.test(e.message ?? '')) throw new HttpError(400, 'One of the files is empty.');
    throw new HttpError(400, 'The upload could not be read; it may have been cut off. Try again.');
  }
  if (refused) {
    await cleanup();
    throw refused;
  }
  const [rawFields, rawFiles] = parsed;
  const fields: Record<string, string> = {};
  for (const name of spec.fields ?? []) {
    const v = rawFields[name];
    if (v && v.length) fields[name] = String(v[0]);
  }
  const files: Record<string, UploadedFile[]> = {};
  const fieldErrors: Record<string, string> = {};
  for (const [name, f] of Object.entries(spec.files)) {
    const list = [...((rawFiles[name] ?? []) as FormidableFile[])].sort((a, b) => (sentOrder.get(a.filepath) ?? 0) - (sentOrder.get(b.filepath) ?? 0));
    files[name] = list.map((x) => ({
      field: name,
      tmpPath: x.filepath,
      originalName: (x.originalFilename ?? 'upload').slice(0, 200),
      declaredMime: x.mimetype ?? 'application/octet-stream',
      sizeBytes: x.size,
      sha256: String(x.hash),
    }));
    for (const x of files[name]) if (x.sizeBytes > f.maxBytes) fieldErrors[name] = `${x.originalName} is ${mb(x.sizeBytes)}; the limit for ${f.label} is ${mb(f.maxBytes)}.`;
    if (f.required && files[name].length === 0) fieldErrors[name] = `Add ${f.label}.`;
  }
  if (Object.keys(fieldErrors).length) {
    await cleanup();
    const tooBig = Object.values(fieldErrors).some((m) => m.includes('the limit'));
    throw new HttpError(tooBig ? 413 : 400, Object.values(fieldErrors)[0], fieldErrors);
  }
  return { fields, files, cleanup };
}
