// A ZIP that carries its own checksums: each file is streamed into the archive one after the other (so only
// one producer runs and memory stays bounded), hashed on the way, and a SHA256SUMS file closes the archive in
// the format `sha256sum -c` checks (GNU coreutils: "<hex>  <name>" per line).
import { createHash } from 'node:crypto';
import { once } from 'node:events';
import { Transform, type Writable } from 'node:stream';
import { ZipArchive } from 'archiver';

/** One file of the archive: its name and what writes its bytes (it must not end the stream). */
export interface ZipPart {
  name: string;
  write(out: Writable): Promise<void>;
}

export interface ZippedFile {
  name: string;
  sha256: string;
  bytes: number;
}

/** The name of the checksum file that ends every pack. */
export const CHECKSUMS_NAME = 'SHA256SUMS';

/** A pass-through that hashes and counts what goes through it. */
class Hashing extends Transform {
  private readonly hash = createHash('sha256');
  bytes = 0;
  _transform(chunk: Buffer, _enc: BufferEncoding, done: (e?: Error | null, data?: Buffer) => void): void {
    this.hash.update(chunk);
    this.bytes += chunk.length;
    done(null, chunk);
  }
  digest(): string {
    return this.hash.digest('hex');
  }
}

/**
 * Writes the parts into a ZIP on `out`, then SHA256SUMS over them. Answers the files and their hashes.
 * A part that fails after bytes went out aborts the archive: the download ends short and a ZIP reader says
 * it is broken, rather than an archive that looks whole and lacks a file.
 */
export async function writeZipWithChecksums(parts: readonly ZipPart[], out: Writable): Promise<ZippedFile[]> {
  const archive = new ZipArchive({ zlib: { level: 6 } });
  const failed = new Promise<never>((_, reject) => archive.on('error', reject));
  failed.catch(() => undefined);
  archive.pipe(out);
  const files: ZippedFile[] = [];
  try {
    for (const part of parts) {
      const hashing = new Hashing();
      const stored = once(archive, 'entry');
      archive.append(hashing, { name: part.name });
      await Promise.race([part.write(hashing).then(() => hashing.end()), failed]);
      await Promise.race([stored, failed]);
      files.push({ name: part.name, sha256: hashing.digest(), bytes: hashing.bytes });
    }
    archive.append(files.map((f) => `${f.sha256}  ${f.name}\n`).join(''), { name: CHECKSUMS_NAME });
    await Promise.race([archive.finalize(), failed]);
    return files;
  } catch (error) {
    archive.abort();
    throw error;
  }
}
