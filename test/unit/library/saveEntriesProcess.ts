/** Child process for the concurrent-save test: adds `count` entries one save at a time. */
import { applyLibraryChange } from '../../../extension/core/model/librarySerialize';
import { updateLibraryFile } from '../../../extension/node/libraryStore';
import { makeEntry } from './libraryFixtures';

async function main(): Promise<void> {
  const [file, prefix, count] = process.argv.slice(2);
  for (let i = 0; i < Number(count); i++) {
    await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { upsert: [makeEntry({ id: `${prefix}${i}`, label: 'pool_leak' })] }));
  }
}

main().catch((error: unknown) => { process.stderr.write(`${String(error)}\n`); process.exit(1); });
