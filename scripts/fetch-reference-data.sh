#!/usr/bin/env bash
# Puts the open data sets that the real-data tests read into reference-data/:
#   - lfw_subset.npy and sample photos from Debian's python3-skimage
#   - Fashion-MNIST (Xiao, Rasul & Vollgraf 2017) from Debian's dataset-fashion-mnist
# Only the data files are unpacked (apt-get download + dpkg -x), so none of the
# packages' dependencies are installed. When apt's package lists are missing (a
# fresh machine), it runs `apt-get update` once, which needs root.
# Exit status: 0 when the data is in place, 1 when it could not be fetched (the
# reason is the last line on stderr).
set -euo pipefail
cd "$(dirname "$0")/.."
target=reference-data
if [[ -f "$target/lfw_subset.npy" && -f "$target/fashion-mnist/t10k-images-idx3-ubyte.gz" && -f "$target/photos/brick.png" ]]; then
  echo "reference data already in $target/"
  exit 0
fi
fail() { echo "reference data not fetched: $*" >&2; exit 1; }
command -v apt-get >/dev/null && command -v dpkg >/dev/null || fail "this machine has no apt-get/dpkg (a Debian or Ubuntu machine is needed)"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
download() { ( cd "$work" && apt-get download python3-skimage dataset-fashion-mnist ) >"$work/apt.log" 2>&1; }
if ! download; then
  # Most often the package lists are missing or stale; refresh them once and retry.
  [[ $(id -u) -eq 0 ]] || fail "apt-get download failed and refreshing the package lists needs root ($(tail -n 1 "$work/apt.log"))"
  apt-get update >"$work/update.log" 2>&1 || fail "apt-get update failed ($(tail -n 1 "$work/update.log"))"
  download || fail "apt-get download failed ($(tail -n 1 "$work/apt.log"))"
fi
mkdir -p "$target"
for deb in "$work"/*.deb; do dpkg -x "$deb" "$work/root"; done
skdata="$work/root/usr/lib/python3/dist-packages/skimage/data"
cp "$skdata/lfw_subset.npy" "$target/"
mkdir -p "$target/photos"
for photo in coins.png moon.png page.png text.png brick.png grass.png gravel.png rocket.jpg coffee.png chelsea.png horse.png motorcycle_left.png; do
  if [[ -f "$skdata/$photo" ]]; then cp "$skdata/$photo" "$target/photos/"; fi
done
mkdir -p "$target/fashion-mnist"
cp "$work"/root/usr/share/datasets/fashion-mnist/*.gz "$target/fashion-mnist/"
echo "reference data written to $target/ ($(du -sh "$target" | cut -f1))"
