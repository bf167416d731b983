// `npm test` on a fresh clone must set itself up (its pretest step, scripts/prepare-tests.sh)
// and then run the real-data tests rather than skip them; where the data cannot be fetched,
// those tests must skip with their reason instead of failing. Both are checked on a copy of
// the repository's tracked files, without reference-data/, running the same scripts and the
// same vitest a user runs.
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';

const REPOSITORY = fileURLToPath(new URL('../../', import.meta.url));
// Two quick test files whose real-data suites read lfw_subset.npy and Fashion-MNIST.
const REAL_DATA_TESTS = ['test/data/npy-reader.test.ts', 'test/data/idx-reader.test.ts'];

interface TestOutcome {
  readonly fullName: string;
  readonly status: string;
}

/** Copies the files a clone would hold — tracked, or new and not ignored — as they are in the working tree, into a new folder; node_modules is linked, not copied. */
function copyOfRepository(): string {
  const copy = mkdtempSync(join(tmpdir(), 'rectboost-clone-'));
  const listed = spawnSync('git', ['ls-files', '-z', '--cached', '--others', '--exclude-standard'], { cwd: REPOSITORY, encoding: 'utf8' });
  expect(listed.status).toBe(0);
  for (const file of listed.stdout.split('\0').filter((name) => name !== '')) {
    if (!existsSync(join(REPOSITORY, file))) continue; // deleted in the working tree
    mkdirSync(dirname(join(copy, file)), { recursive: true });
    copyFileSync(join(REPOSITORY, file), join(copy, file));
  }
  symlinkSync(join(REPOSITORY, 'node_modules'), join(copy, 'node_modules'));
  return copy;
}

/** The environment of a user's shell: no CI variable, so missing data may skip. */
function userEnvironment(path = process.env.PATH ?? ''): NodeJS.ProcessEnv {
  const environment: NodeJS.ProcessEnv = { ...process.env, PATH: path };
  delete environment.CI;
  delete environment.VITEST;
  delete environment.VITEST_WORKER_ID;
  delete environment.VITEST_POOL_ID;
  delete environment.NODE_ENV;
  return environment;
}

/** Runs vitest on the real-data test files in `copy` and returns every test's outcome. */
function runRealDataTests(copy: string, environment: NodeJS.ProcessEnv): { status: number | null; outcomes: TestOutcome[] } {
  const report = join(copy, 'vitest-report.json');
  const run = spawnSync(process.execPath, [join(copy, 'node_modules/vitest/vitest.mjs'), 'run', ...REAL_DATA_TESTS, '--reporter=json', `--outputFile=${report}`], {
    cwd: copy,
    env: environment,
    encoding: 'utf8',
  });
  const parsed = JSON.parse(readFileSync(report, 'utf8')) as { testResults: { assertionResults: TestOutcome[] }[] };
  return { status: run.status, outcomes: parsed.testResults.flatMap((file) => file.assertionResults) };
}

const aptPresent = spawnSync('sh', ['-c', 'command -v apt-get && command -v dpkg']).status === 0;
const isRoot = process.getuid?.() === 0;

describe('a fresh clone', () => {
  describe.skipIf(!(aptPresent && isRoot) && !process.env.CI)('where apt can fetch the data (root on Debian, like CI)', () => {
    let copy: string;
    let prepared: ReturnType<typeof spawnSync>;
    beforeAll(() => {
      copy = copyOfRepository();
      prepared = spawnSync('bash', ['scripts/prepare-tests.sh'], { cwd: copy, env: userEnvironment(), encoding: 'utf8' });
    });

    it('gets the reference data from npm test’s set-up step', () => {
      expect(prepared.status).toBe(0);
      for (const file of ['lfw_subset.npy', 'fashion-mnist/t10k-images-idx3-ubyte.gz', 'fashion-mnist/train-labels-idx1-ubyte.gz', 'photos/brick.png']) {
        expect(existsSync(join(copy, 'reference-data', file)), file).toBe(true);
      }
    });

    it('then runs the real-data tests, and none is skipped', () => {
      const { status, outcomes } = runRealDataTests(copy, userEnvironment());
      expect(status).toBe(0);
      const realData = outcomes.filter((outcome) => /lfw_subset\.npy against numpy|Fashion-MNIST (train|test) split/.test(outcome.fullName));
      // npy-reader has 2 lfw_subset tests; idx-reader 2 per split (test/fixtures/dataset-reference.json lists both splits).
      expect(realData.length).toBeGreaterThanOrEqual(6);
      expect(realData.map((outcome) => outcome.status)).toEqual(realData.map(() => 'passed'));
      expect(outcomes.filter((outcome) => outcome.status !== 'passed')).toEqual([]);
    });
  });

  describe('where the data cannot be fetched (no apt-get on the PATH)', () => {
    let copy: string;
    let prepared: ReturnType<typeof spawnSync>;
    let path: string;
    beforeAll(() => {
      copy = copyOfRepository();
      // A PATH with every command of /usr/bin and /bin but apt-get and dpkg.
      const bin = mkdtempSync(join(tmpdir(), 'rectboost-no-apt-'));
      for (const folder of ['/usr/local/bin', '/usr/bin', '/bin']) {
        if (!existsSync(folder)) continue;
        for (const name of readdirSync(folder)) {
          if (/^(apt|dpkg)/.test(name) || existsSync(join(bin, name))) continue;
          symlinkSync(join(folder, name), join(bin, name));
        }
      }
      path = bin;
      prepared = spawnSync('bash', ['scripts/prepare-tests.sh'], { cwd: copy, env: userEnvironment(path), encoding: 'utf8' });
    });

    it('lets npm test go on, saying in one line why the real-data tests will be skipped', () => {
      expect(prepared.status).toBe(0);
      expect(prepared.stderr).toMatch(/reference data not fetched: this machine has no apt-get\/dpkg/);
      expect(existsSync(join(copy, 'reference-data', 'lfw_subset.npy'))).toBe(false);
    });

    it('skips each real-data suite with its reason and fails nothing', () => {
      const { status, outcomes } = runRealDataTests(copy, userEnvironment(path));
      expect(status).toBe(0);
      const skipped = outcomes.filter((outcome) => outcome.status !== 'passed');
      // One placeholder per suite: lfw_subset in npy-reader, and one per Fashion-MNIST split.
      expect(skipped.length).toBe(3);
      for (const outcome of skipped) {
        expect(['skipped', 'pending']).toContain(outcome.status);
        expect(outcome.fullName).toMatch(/needs reference-data\/\S+.*: run `npm test` as root with apt \(it fetches them\) or `bash scripts\/fetch-reference-data\.sh`/);
      }
      // The tests that need no data still ran and passed.
      expect(outcomes.filter((outcome) => outcome.status === 'passed').length).toBeGreaterThan(10);
    });
  });
});
