// Reading blobs for the benchmarks' floors: one `git cat-file --batch` for all of them.
import { spawn } from 'node:child_process';

/** The texts of the blobs `ids` (in their order), read with one `git cat-file --batch`. */
export function readBlobs(repo, ids) {
  return new Promise((resolve, reject) => {
    const child = spawn('git', ['-C', repo, 'cat-file', '--batch'], { stdio: ['pipe', 'pipe', 'inherit'] });
    const chunks = [];
    child.stdout.on('data', (b) => chunks.push(b));
    child.on('error', reject);
    child.on('close', () => {
      const buf = Buffer.concat(chunks);
      const texts = [];
      let at = 0;
      while (at < buf.length) {
        const nl = buf.indexOf(0x0a, at);
        const size = Number(buf.subarray(at, nl).toString().split(' ')[2]);
        texts.push(buf.subarray(nl + 1, nl + 1 + size).toString('utf8'));
        at = nl + 1 + size + 1;
      }
      resolve(texts);
    });
    child.stdin.end(ids.map((id) => `${id}\n`).join(''));
  });
}
