// Node only (not re-exported by index.ts, which stays browser-safe): write a whole file or nothing.
// The text goes to a temporary file in the same folder, is flushed to disk, and is renamed over
// the target — rename(2) within one file system is atomic (POSIX), so a reader sees the old file or
// the new one, never a half-written one, and a failure leaves the old file as it was.
import { open, rename, rm } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';

export async function writeFileAtomic(path: string, text: string): Promise<void> {
  const temp = join(dirname(path), `.${basename(path)}.${process.pid}.${Date.now()}.tmp`);
  try {
    const handle = await open(temp, 'wx');
    try {
      await handle.writeFile(text, 'utf8');
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, path);
  } catch (err) {
    await rm(temp, { force: true });
    throw err;
  }
}
