/**
 * The little of the tar format (POSIX ustar) that Coilpath's backups need: regular files with short names,
 * written as a stream of 512-byte blocks and read back as a stream. A backup is such a tar, gzipped, so
 * `tar -tzf backup.tar.gz` lists it and `tar -xzf` unpacks it with standard tools.
 */

const BLOCK = 512;
/** 11 octal digits: the largest size a plain ustar header holds. */
const MAX_SIZE = 8 ** 11 - 1;

export class TarError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TarError';
  }
}

function writeOctal(block: Buffer, offset: number, width: number, value: number) {
  block.write(`${value.toString(8).padStart(width - 1, '0')}\0`, offset, width, 'ascii');
}

/** The header block of a regular file. Names up to 100 bytes (Coilpath's are under 60). */
export function tarHeader(name: string, size: number, mtime: Date, mode = 0o644): Buffer {
  const nameBytes = Buffer.from(name, 'utf8');
  if (nameBytes.length === 0 || nameBytes.length > 100) throw new TarError(`The name ${name} does not fit a tar header.`);
  if (!Number.isSafeInteger(size) || size < 0 || size > MAX_SIZE)
    throw new TarError(`${name} is too large for a tar entry (${size} bytes).`);
  const h = Buffer.alloc(BLOCK);
  nameBytes.copy(h, 0);
  writeOctal(h, 100, 8, mode);
  writeOctal(h, 108, 8, 0); // uid
  writeOctal(h, 116, 8, 0); // gid
  writeOctal(h, 124, 12, size);
  writeOctal(h, 136, 12, Math.floor(mtime.getTime() / 1000));
  h.write('        ', 148, 8, 'ascii'); // checksum field counts as spaces while summing
  h.write('0', 156, 1, 'ascii'); // regular file
  h.write('ustar\0', 257, 6, 'ascii');
  h.write('00', 263, 2, 'ascii');
  let sum = 0;
  for (const b of h) sum += b;
  h.write(`${sum.toString(8).padStart(6, '0')}\0 `, 148, 8, 'ascii');
  return h;
}

/** Zeros that bring an entry of `size` bytes to a whole number of blocks. */
export function tarPadding(size: number): Buffer {
  const rest = size % BLOCK;
  return Buffer.alloc(rest === 0 ? 0 : BLOCK - rest);
}

/** The end of an archive: two zero blocks. */
export function tarEnd(): Buffer {
  return Buffer.alloc(BLOCK * 2);
}

/** Exact reads from a stream of chunks. */
class ByteReader {
  private buf: Buffer = Buffer.alloc(0);
  private ended = false;
  constructor(private readonly it: AsyncIterator<Buffer>) {}

  private async fill(): Promise<boolean> {
    if (this.ended) return false;
    const r = await this.it.next();
    if (r.done) {
      this.ended = true;
      return false;
    }
    const chunk = Buffer.isBuffer(r.value) ? r.value : Buffer.from(r.value as Uint8Array);
    this.buf = this.buf.length > 0 ? Buffer.concat([this.buf, chunk]) : chunk;
    return true;
  }

  /** Exactly `n` bytes; `null` if the stream ended before any byte of them. */
  async exact(n: number): Promise<Buffer | null> {
    while (this.buf.length < n) {
      if (!(await this.fill())) {
        if (this.buf.length === 0) return null;
        throw new TarError('The archive ends in the middle of a block: it is truncated.');
      }
    }
    const out = this.buf.subarray(0, n);
    this.buf = this.buf.subarray(n);
    return out;
  }

  /** Between 1 and `max` bytes. */
  async upTo(max: number): Promise<Buffer> {
    if (this.buf.length === 0 && !(await this.fill())) throw new TarError('The archive ends in the middle of an entry: it is truncated.');
    const out = this.buf.subarray(0, Math.min(max, this.buf.length));
    this.buf = this.buf.subarray(out.length);
    return out;
  }
}

function readString(h: Buffer, offset: number, width: number): string {
  const field = h.subarray(offset, offset + width);
  const nul = field.indexOf(0);
  return field.subarray(0, nul === -1 ? width : nul).toString('utf8');
}

function readOctal(h: Buffer, offset: number, width: number): number {
  const text = readString(h, offset, width).trim();
  if (!/^[0-7]+$/.test(text)) throw new TarError('A tar header holds a number that is not octal: the archive is damaged.');
  return parseInt(text, 8);
}

function checksumOk(h: Buffer): boolean {
  let sum = 0;
  for (let i = 0; i < BLOCK; i++) sum += i >= 148 && i < 156 ? 32 : h[i]!;
  return readOctal(h, 148, 8) === sum;
}

/**
 * Reads a tar stream entry by entry: `onEntry` gets each regular file's name, size and content (which it
 * may read in full or leave; the rest is skipped). Directory entries are passed over; any other kind of
 * entry, a damaged header or a stream that ends before the archive's end is a `TarError`.
 */
export async function readTar(
  input: AsyncIterable<Buffer>,
  onEntry: (entry: { name: string; size: number; content: AsyncIterable<Buffer> }) => Promise<void>,
): Promise<void> {
  const r = new ByteReader(input[Symbol.asyncIterator]());
  for (;;) {
    const h = await r.exact(BLOCK);
    if (!h) throw new TarError('The archive ends without its end marker: it is truncated.');
    if (h.every((b) => b === 0)) return; // end of archive
    if (!checksumOk(h)) throw new TarError('A tar header fails its checksum: the archive is damaged.');
    const name = readString(h, 0, 100);
    const prefix = readString(h, 345, 155);
    const fullName = prefix ? `${prefix}/${name}` : name;
    const size = readOctal(h, 124, 12);
    const type = String.fromCharCode(h[156]!);
    if (type === '5') continue;
    if (type !== '0' && type !== '\0') throw new TarError(`The archive holds ${fullName}, which is not a plain file (type ${type}).`);

    let left = size;
    const content = (async function* () {
      while (left > 0) {
        const chunk = await r.upTo(Math.min(left, 1024 * 1024));
        left -= chunk.length;
        yield chunk;
      }
    })();
    await onEntry({ name: fullName, size, content });
    while (left > 0) left -= (await r.upTo(Math.min(left, 1024 * 1024))).length;
    const pad = tarPadding(size).length;
    if (pad > 0 && !(await r.exact(pad))) throw new TarError('The archive ends in the middle of an entry: it is truncated.');
  }
}
