#!/usr/bin/env bash
# Renders the figures of every shipped demo to PNG so that they can be looked at.
#
#   scripts/render_figures.sh [OUTPUT_FOLDER]      (default: demo-figures)
#
# Runs `holecast spectrum` for each channels/demo-*.json target at the README's laser
# (1.5e14 W/cm², 800 nm) and for the argon-like atom with each example laser in lasers/, then
# converts every SVG to PNG with rsvg-convert (Debian/Ubuntu package librsvg2-bin) on a white
# background. Prints the PNG paths.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
out="${1:-demo-figures}"

if ! command -v rsvg-convert >/dev/null 2>&1; then
    if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
        echo "rsvg-convert not found: installing librsvg2-bin with apt-get" >&2
        apt-get update -qq && apt-get install -y -qq librsvg2-bin >/dev/null
    else
        echo "rsvg-convert is needed: install it with 'sudo apt-get install librsvg2-bin'" >&2
        echo "(Debian/Ubuntu; 'brew install librsvg' on macOS, 'dnf install librsvg2-tools' on Fedora)" >&2
        exit 1
    fi
fi

cargo build --release --quiet --manifest-path "$here/Cargo.toml"
bin="$here/target/release/holecast"
mkdir -p "$out"

run() { # name, then the spectrum arguments
    local name="$1"
    shift
    "$bin" --quiet spectrum "$@" --out "$out/$name" >/dev/null 2>"$out/$name.log" || {
        echo "holecast failed for $name (see $out/$name.log)" >&2
        return 1
    }
}

for target in "$here"/channels/demo-*.json; do
    name="$(basename "$target" .json)"
    run "$name" "$target" --intensity 1.5e14 --wavelength 800
done
for laser in "$here"/lasers/*.json; do
    name="argon-like-$(basename "$laser" .json)"
    run "$name" "$here/channels/argon-like.json" --laser "$laser"
done

find "$out" -name '*.svg' | sort | while read -r svg; do
    png="${svg%.svg}.png"
    rsvg-convert --background-color=white "$svg" -o "$png"
    echo "$png"
done
