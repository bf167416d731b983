import { randomBytes } from 'node:crypto';
import { mkdir, open, rename, rm } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';

/**
 * Writes a file so that readers see either the old content or the whole new
 * content, never a part: write to a temporary file beside it, flush it to disk,
 * then rename over the target (rename is atomic within one file system).
 * The temporary file is removed if anything fails.
 */
export async function writeFileAtomic(path: string, content: string | Uint8Array): Promise<void> {
  const directory = dirname(path);
  await mkdir(directory, { recursive: true });
  const temporary = join(directory, `.rectboost-tmp-${basename(path)}-${randomBytes(4).toString('hex')}`);
  try {
    const handle = await open(temporary, 'w');
    try {
      await handle.writeFile(content);
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
