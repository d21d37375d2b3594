/**
 * Random-access bytes for incremental readers. A browser or worker wraps a File/Blob with `blobSource`; the
 * command line can wrap a file handle the same way (`read` returning exactly `length` bytes unless the end is hit).
 */
import { FormatError } from './format-error';

export interface ByteSource {
  /** Total size in bytes. */
  readonly size: number;
  /** Resolves with `length` bytes starting at `offset` (fewer only at the end of the source). */
  read(offset: number, length: number): Promise<Uint8Array>;
}

/** A source over bytes already in memory; `read` returns views, never copies. */
export function bytesSource(data: Uint8Array | ArrayBuffer): ByteSource {
  const bytes = data instanceof Uint8Array ? data : new Uint8Array(data);
  return {
    size: bytes.length,
    read: async (offset, length) => bytes.subarray(offset, Math.min(bytes.length, offset + length)),
  };
}

/** A source over a Blob (or File) read slice by slice, so a large recording is never held twice. */
export function blobSource(blob: Blob): ByteSource {
  return {
    size: blob.size,
    read: async (offset, length) => new Uint8Array(await blob.slice(offset, offset + length).arrayBuffer()),
  };
}

/** Reads exactly `length` bytes or throws a FormatError naming `field` and the offset where the bytes ran out. */
export async function readExactly(source: ByteSource, offset: number, length: number, field: string): Promise<Uint8Array> {
  const bytes = await source.read(offset, length);
  if (bytes.length !== length) {
    throw new FormatError(field, `is truncated: expected ${length} bytes at this offset, the file gives ${bytes.length}`, {
      byteOffset: offset + bytes.length,
    });
  }
  return bytes;
}
