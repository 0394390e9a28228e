import { readSync } from 'node:fs';

const CHUNK_BYTES = 1 << 20;

/**
 * Lines of a text file read in 1 MB chunks from byte `start` (no whole-file string).
 * Yields lines without their "\n" / "\r\n"; the last line is yielded even without a newline.
 */
export function* readLines(fd: number, start = 0): Generator<string> {
  const buf = Buffer.allocUnsafe(CHUNK_BYTES);
  let position = start;
  let rest = '';
  for (;;) {
    const n = readSync(fd, buf, 0, CHUNK_BYTES, position);
    if (n === 0) break;
    position += n;
    // latin1 keeps bytes 1:1, so a multi-byte UTF-8 character split across chunks cannot break
    // numbers; header names are ASCII in practice.
    const text = rest + buf.toString('latin1', 0, n);
    let from = 0;
    for (;;) {
      const nl = text.indexOf('\n', from);
      if (nl < 0) break;
      const end = nl > from && text.charCodeAt(nl - 1) === 13 ? nl - 1 : nl;
      yield text.slice(from, end);
      from = nl + 1;
    }
    rest = text.slice(from);
  }
  if (rest.length > 0) yield rest.endsWith('\r') ? rest.slice(0, -1) : rest;
}

/** Number of "\n" bytes from byte `start` to the end of the file (an upper bound on data lines − 1). */
export function countNewlines(fd: number, start = 0): number {
  const buf = Buffer.allocUnsafe(CHUNK_BYTES);
  let position = start;
  let count = 0;
  for (;;) {
    const n = readSync(fd, buf, 0, CHUNK_BYTES, position);
    if (n === 0) break;
    position += n;
    let at = buf.indexOf(10);
    while (at >= 0 && at < n) {
      count++;
      at = buf.indexOf(10, at + 1);
    }
  }
  return count;
}
