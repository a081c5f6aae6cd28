/**
 * Node adapter for the ingest core: streams an export file from disk in chunks into the pure
 * readers (a gzip-compressed file through gunzip), with progress, cancellation and a sha256 of the
 * file's bytes computed in the same pass.
 * Memory stays near the numeric payload: text is decoded and parsed one chunk at a time.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { open, stat, type FileHandle } from 'node:fs/promises';
import { pipeline } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { StringDecoder } from 'node:string_decoder';
import { buildFrame, type BuildFrameOptions } from '../core/frame/buildFrame';
import type { MetricFrame } from '../core/frame/types';
import { createExportReader } from '../core/ingest/createExportReader';
import type { ExportReader } from '../core/ingest/exportReader';
import { sniffFormat } from '../core/ingest/sniffFormat';
import type { ExportFormat, IngestOptions, IngestResult } from '../core/ingest/types';

/** Options of `readExportFile`: progress/cancellation plus an optional forced format. */
export interface ReadExportOptions extends IngestOptions {
  /** Skip sniffing and read as this format. */
  readonly format?: ExportFormat;
  /** Bytes per read; default 64 KiB. */
  readonly chunkBytes?: number;
}

/** Thrown when the user cancelled a read (not an input problem). */
export class IngestCancelledError extends Error {
  override readonly name = 'IngestCancelledError';
}

/** Thrown when the file itself cannot be read (missing, a directory, no permission). */
export class ExportFileError extends Error {
  override readonly name = 'ExportFileError';
}

/** A loaded export: what was read, the aligned frame and the file's sha256 (hex). */
export interface LoadedExport {
  readonly result: IngestResult;
  readonly frame: MetricFrame;
  readonly sha256: string;
}

/** Bytes sniffed before choosing a reader. */
const SNIFF_BYTES = 64 * 1024;

/**
 * Reads an export file of any supported format (sniffed from its first 64 KiB, file name as a
 * hint) in chunks. Bad content never throws: it comes back as issues naming the file and line.
 * @throws ExportFileError when the file cannot be opened or read; IngestCancelledError on cancel.
 */
export async function readExportFile(path: string, options: ReadExportOptions = {}): Promise<IngestResult> {
  return (await streamExport(path, options, false)).result;
}

/** sha256 of a file's bytes as lowercase hex, streamed (constant memory). */
export async function sha256File(path: string): Promise<string> {
  const hash = createHash('sha256');
  try {
    for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) hash.update(chunk as Buffer);
  } catch (err) {
    throw toFileError(path, err);
  }
  return hash.digest('hex');
}

/**
 * Reads an export, hashes it in the same pass and aligns it into a MetricFrame.
 * @throws ExportFileError, IngestCancelledError, or FrameTooLargeError (from buildFrame).
 */
export async function loadFrame(path: string, options: ReadExportOptions & BuildFrameOptions = {}): Promise<LoadedExport> {
  const { result, sha256 } = await streamExport(path, options, true);
  if (options.isCancelled?.() === true) throw new IngestCancelledError(`reading ${path} was cancelled`);
  return { result, frame: buildFrame(result, options), sha256 };
}

async function streamExport(path: string, options: ReadExportOptions, isHashing: boolean): Promise<{ result: IngestResult; sha256: string }> {
  let totalBytes: number;
  try {
    const info = await stat(path);
    if (!info.isFile()) throw new ExportFileError(`${path}: expected a file, got a ${info.isDirectory() ? 'directory' : 'special file'}`);
    totalBytes = info.size;
  } catch (err) {
    throw toFileError(path, err);
  }
  const hash = isHashing ? createHash('sha256') : undefined;
  let decoder: StringDecoder | undefined;
  let reader: ExportReader | undefined;
  let head = '';
  let bytesRead = 0;
  const isGzip = await isGzipFile(path);
  // 64 KiB chunks keep each parsed batch in the CPU cache (measured faster than 1 MiB in bench/ingest).
  const file = createReadStream(path, { highWaterMark: options.chunkBytes ?? 1 << 16 });
  // A gzip export is read through gunzip; the hash and the progress count the file's own bytes.
  if (isGzip) file.on('data', (bytes: string | Buffer) => { hash?.update(bytes); bytesRead += bytes.length; });
  const stream = isGzip ? pipeline(file, createGunzip(), () => undefined) : file;
  try {
    for await (const raw of stream) {
      const chunk = raw as Buffer;
      if (options.isCancelled?.() === true) { stream.destroy(); file.destroy(); throw new IngestCancelledError(`reading ${path} was cancelled`); }
      if (!isGzip) { hash?.update(chunk); bytesRead += chunk.length; }
      decoder ??= new StringDecoder(chunk[0] === 0xff && chunk[1] === 0xfe ? 'utf16le' : 'utf8');
      const text = decoder.write(chunk);
      if (reader === undefined) {
        head += text;
        if (head.length >= SNIFF_BYTES) { reader = startReader(path, head, options); head = ''; }
      } else {
        reader.push(text);
      }
      options.onProgress?.(bytesRead, totalBytes);
    }
  } catch (err) {
    if (err instanceof IngestCancelledError) throw err;
    if (isGzip && (err as NodeJS.ErrnoException).code?.startsWith('Z_')) throw new ExportFileError(`${path}: expected gzip-compressed data after its gzip header, got ${(err as Error).message} (a truncated or damaged .gz file?)`);
    throw toFileError(path, err);
  }
  // The gzip trailer follows the last decompressed bytes: report the whole file read.
  if (isGzip) options.onProgress?.(bytesRead, totalBytes);
  const tail = decoder?.end() ?? '';
  if (reader === undefined) reader = startReader(path, head + tail, options);
  else if (tail !== '') reader.push(tail);
  return { result: reader.finish(), sha256: hash?.digest('hex') ?? '' };
}

/** True when the file starts with the gzip magic bytes 1f 8b (RFC 1952 §2.3.1). */
async function isGzipFile(path: string): Promise<boolean> {
  let handle: FileHandle | undefined;
  try {
    handle = await open(path, 'r');
    const magic = Buffer.alloc(2);
    const { bytesRead } = await handle.read(magic, 0, 2, 0);
    return bytesRead === 2 && magic[0] === 0x1f && magic[1] === 0x8b;
  } catch (err) {
    throw toFileError(path, err);
  } finally {
    await handle?.close();
  }
}

function startReader(path: string, head: string, options: ReadExportOptions): ExportReader {
  // "export.csv.gz" is sniffed as "export.csv".
  const format = options.format ?? sniffFormat(head, path.replace(/\.gz$/i, '')).format;
  const reader = createExportReader(format, path);
  if (head !== '') reader.push(head);
  return reader;
}

function toFileError(path: string, err: unknown): Error {
  if (err instanceof ExportFileError || err instanceof IngestCancelledError) return err;
  const code = (err as NodeJS.ErrnoException).code;
  const reason = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : code === 'EISDIR' ? 'is a directory' : (err as Error).message;
  return new ExportFileError(`${path}: cannot read the export (${reason})`);
}
