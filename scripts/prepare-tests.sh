#!/usr/bin/env bash
# `npm test`'s set-up step (the pretest script): puts in place what the tests need
# beyond npm packages, so that a fresh clone passes the README's test command alone.
#   - the open reference data sets (scripts/fetch-reference-data.sh)
#   - the Debian packages some tests run (TEST_PACKAGES below), installed with apt-get
#     when missing and this is root on a Debian machine
# Outside CI, whatever cannot be set up is said in one line and the tests that need it
# skip with their reason; under CI (CI set) it fails, so nothing passes by skipping.
set -uo pipefail
cd "$(dirname "$0")/.."
# Debian package, and the command that shows it is installed.
TEST_PACKAGES=(
  slurm-wlm:slurmctld munge:munged   # test/slurm: a one-node Slurm cluster for the job-array recipe
  chromium:chromium                  # test/report: the report page in a real browser; test/runtime: rectboost/runtime in a browser
  gcc:cc                             # test/runtime: the C99 export, compiled with the sanitizers
)
problems=0
note() { echo "prepare-tests: $*" >&2; problems=$((problems + 1)); }

bash scripts/fetch-reference-data.sh >/dev/null || note "the real-data tests will be skipped (see the line above)"

missing=()
for entry in "${TEST_PACKAGES[@]}"; do
  package=${entry%%:*}; command=${entry#*:}
  command -v "$command" >/dev/null || missing+=("$package")
done
if ((${#missing[@]} > 0)); then
  if [[ $(id -u) -eq 0 ]] && command -v apt-get >/dev/null; then
    echo "prepare-tests: installing ${missing[*]} with apt-get (once)" >&2
    { DEBIAN_FRONTEND=noninteractive apt-get install -y -q "${missing[@]}" || { apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y -q "${missing[@]}"; }; } >/tmp/rectboost-prepare-apt.log 2>&1 \
      || note "apt-get install ${missing[*]} failed (log: /tmp/rectboost-prepare-apt.log); the tests that need them will be skipped"
  else
    note "missing ${missing[*]}: install them (sudo apt-get install ${missing[*]}); until then the tests that need them are skipped"
  fi
fi
if ((problems > 0)) && [[ -n "${CI:-}" ]]; then
  echo "prepare-tests: under CI nothing may be skipped; stopping" >&2
  exit 1
fi
exit 0
