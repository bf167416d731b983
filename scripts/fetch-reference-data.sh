#!/usr/bin/env bash
# Puts the open data sets that the real-data tests read into reference-data/:
#   - lfw_subset.npy and sample photos from Debian's python3-skimage
#   - Fashion-MNIST (Xiao, Rasul & Vollgraf 2017) from Debian's dataset-fashion-mnist
# Only the data files are unpacked (apt-get download + dpkg -x), so none of the
# packages' dependencies are installed. Needs `apt-get update` to have run once.
set -euo pipefail
cd "$(dirname "$0")/.."
target=reference-data
mkdir -p "$target"
if [[ -f "$target/lfw_subset.npy" && -f "$target/fashion-mnist/t10k-images-idx3-ubyte.gz" && -f "$target/photos/brick.png" ]]; then
  echo "reference data already in $target/"
  exit 0
fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
( cd "$work" && apt-get download python3-skimage dataset-fashion-mnist >/dev/null )
for deb in "$work"/*.deb; do dpkg -x "$deb" "$work/root"; done
skdata="$work/root/usr/lib/python3/dist-packages/skimage/data"
cp "$skdata/lfw_subset.npy" "$target/"
mkdir -p "$target/photos"
for photo in coins.png moon.png page.png text.png brick.png grass.png gravel.png rocket.jpg coffee.png chelsea.png horse.png motorcycle_left.png; do
  if [[ -f "$skdata/$photo" ]]; then cp "$skdata/$photo" "$target/photos/"; fi
done
mkdir -p "$target/fashion-mnist"
cp "$work"/root/usr/share/datasets/fashion-mnist/*.gz "$target/fashion-mnist/"
echo "reference data written to $target/"
ls -R "$target" | head -40
