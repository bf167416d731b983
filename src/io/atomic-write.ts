import { randomBytes } from 'node:crypto';
import { mkdir, open, rename, rm, type FileHandle } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';

/**
 * Writes a file so that readers see either the old content or the whole new
 * content, never a part: write to a temporary file beside it, flush it to disk,
 * then rename over the target (rename is atomic within one file system).
 * The temporary file is removed if anything fails.
 */
export async function writeFileAtomic(path: string, content: string | Uint8Array): Promise<void> {
  await writeThroughTemporary(path, (handle) => handle.writeFile(content));
}

/**
 * writeFileAtomic for content that comes as a stream of lines (each written with
 * a newline after it), so a large file never has to be held in memory.
 */
export async function writeLinesAtomic(path: string, lines: Iterable<string> | AsyncIterable<string>): Promise<void> {
  await writeThroughTemporary(path, async (handle) => {
    let buffered: string[] = [];
    let size = 0;
    for await (const line of lines) {
      buffered.push(line, '\n');
      size += line.length + 1;
      if (size >= 1 << 20) {
        await handle.write(buffered.join(''));
        buffered = [];
        size = 0;
      }
    }
    if (buffered.length > 0) await handle.write(buffered.join(''));
  });
}

async function writeThroughTemporary(path: string, write: (handle: FileHandle) => Promise<void>): Promise<void> {
  const directory = dirname(path);
  await mkdir(directory, { recursive: true });
  const temporary = join(directory, `.rectboost-tmp-${basename(path)}-${randomBytes(4).toString('hex')}`);
  try {
    const handle = await open(temporary, 'w');
    try {
      await write(handle);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temporary, path);
  } catch (error) {
    await rm(temporary, { force: true });
    throw error;
  }
}
