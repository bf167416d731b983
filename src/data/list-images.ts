import { readdir, stat } from 'node:fs/promises';
import { join, relative } from 'node:path';
import { RectboostError } from '../errors.js';
import { hasImageExtension } from '../io/decode-image.js';

/**
 * Image files under a folder (recursively, hidden entries skipped), or the
 * path itself when it is a file; sorted by path so that every run sees the
 * same order.
 * @throws RectboostError `bad-data` when the path does not exist or cannot be read.
 */
export async function listImageFiles(path: string): Promise<string[]> {
  let info;
  try {
    info = await stat(path);
  } catch (error) {
    throw new RectboostError('bad-data', `${path} does not exist or cannot be read.`, { cause: error });
  }
  if (info.isFile()) return [path];
  const found: string[] = [];
  await walk(path, found);
  found.sort((a, b) => (relative(path, a) < relative(path, b) ? -1 : 1));
  return found;
}

async function walk(folder: string, found: string[]): Promise<void> {
  let entries;
  try {
    entries = await readdir(folder, { withFileTypes: true });
  } catch (error) {
    throw new RectboostError('bad-data', `Folder ${folder} cannot be read.`, { cause: error });
  }
  for (const entry of entries) {
    if (entry.name.startsWith('.')) continue;
    const full = join(folder, entry.name);
    if (entry.isDirectory()) await walk(full, found);
    else if (entry.isFile() && hasImageExtension(entry.name)) found.push(full);
  }
}

/** Image files of several paths (files or folders), in the order given. */
export async function listImageFilesOfAll(paths: readonly string[]): Promise<string[]> {
  const all: string[] = [];
  for (const path of paths) all.push(...(await listImageFiles(path)));
  return all;
}
