// Runs scripts/peers/peer_reference.py with Debian's python3 and parses the one JSON
// object it prints. The peers are optional: when the interpreter or a library is
// missing, findPythonPeer says which, and the benchmark skips that peer.
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/** Debian's interpreter; the pyenv python3 on PATH lacks scikit-image and scikit-learn. */
export const PYTHON = process.env.RECTBOOST_PEER_PYTHON ?? '/usr/bin/python3';
const SCRIPT = fileURLToPath(new URL('./peer_reference.py', import.meta.url));

/** Runs one subcommand; resolves to its JSON result, rejects with its stderr tail on failure. */
export function runPeer(args) {
  return new Promise((resolve, reject) => {
    const child = spawn(PYTHON, [SCRIPT, ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk) => { stdout += chunk; });
    child.stderr.on('data', (chunk) => {
      stderr += chunk;
      process.stderr.write(chunk);
    });
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) {
        reject(new Error(`${PYTHON} peer_reference.py ${args[0]} exited with code ${code}: ${stderr.trim().split('\n').slice(-3).join(' | ')}`));
        return;
      }
      try {
        resolve(JSON.parse(stdout.trim().split('\n').pop()));
      } catch (error) {
        reject(new Error(`peer_reference.py ${args[0]} printed no JSON result: ${stdout.slice(0, 200)}`));
      }
    });
  });
}

/**
 * Which peers can run: `{ versions, skimage: reason|null, sklearn: reason|null }`,
 * where a reason (a sentence) means that peer is skipped.
 */
export async function findPythonPeer() {
  if (!existsSync(PYTHON)) {
    const reason = `${PYTHON} is not installed (apt-get install python3 python3-skimage python3-sklearn)`;
    return { versions: null, skimage: reason, sklearn: reason };
  }
  let versions;
  try {
    versions = await runPeer(['versions']);
  } catch (error) {
    const reason = `${PYTHON} could not run the peer script (${error.message})`;
    return { versions: null, skimage: reason, sklearn: reason };
  }
  const missing = (name, debian) =>
    versions.missing.includes(name) || versions.missing.includes('numpy')
      ? `${name} is not importable by ${PYTHON} (apt-get install ${debian})`
      : null;
  return { versions, skimage: missing('scikit-image', 'python3-skimage'), sklearn: missing('scikit-learn', 'python3-sklearn') };
}
