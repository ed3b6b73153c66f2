#!/usr/bin/env bash
# Fetch the Gene Ontology SQLite database shipped by Debian's package
# r-bioc-go.db (Bioconductor GO.db), into a cache folder outside the repo.
#
#   scripts/fetch-go.sh            # prints the path of GO.sqlite on stdout
#
# Cache: ${TERMDRIFT_CACHE:-$HOME/.cache/termdrift}/go/
# Idempotent: when GO.sqlite is already cached, nothing is downloaded.
# Needs apt-get and dpkg (Debian/Ubuntu). Progress goes to stderr, so that
# stdout carries only the path.
set -euo pipefail

PACKAGE=r-bioc-go.db
CACHE_ROOT="${TERMDRIFT_CACHE:-$HOME/.cache/termdrift}"
GO_DIR="$CACHE_ROOT/go"
SQLITE_LINK="$GO_DIR/GO.sqlite"

log() { printf 'fetch-go: %s\n' "$*" >&2; }

if [[ -s "$SQLITE_LINK" ]]; then
  log "cached: $SQLITE_LINK"
  printf '%s\n' "$SQLITE_LINK"
  exit 0
fi

for tool in apt-get dpkg find; do
  if ! command -v "$tool" >/dev/null 2>&1; then
    log "error: '$tool' not found; this script needs a Debian-based system (apt-get, dpkg)"
    exit 2
  fi
done

mkdir -p "$GO_DIR"
cd "$GO_DIR"

deb=$(find . -maxdepth 1 -name "${PACKAGE}_*.deb" -print -quit)
if [[ -z "$deb" ]]; then
  # apt-get download needs a package list; refresh it once if the package is unknown.
  if ! apt-cache show "$PACKAGE" >/dev/null 2>&1; then
    log "package list lacks $PACKAGE; running apt-get update"
    apt-get update >&2
  fi
  log "downloading $PACKAGE into $GO_DIR"
  # apt-get download drops privileges to the _apt user when run as root;
  # that user must be able to write here, so download into a world-writable temp dir.
  tmp=$(mktemp -d)
  chmod 777 "$tmp"
  (cd "$tmp" && apt-get download "$PACKAGE" >&2)
  mv "$tmp"/"${PACKAGE}"_*.deb .
  rmdir "$tmp"
  deb=$(find . -maxdepth 1 -name "${PACKAGE}_*.deb" -print -quit)
fi
if [[ -z "$deb" ]]; then
  log "error: apt-get download $PACKAGE produced no .deb in $GO_DIR"
  exit 1
fi

log "unpacking $deb"
rm -rf "$GO_DIR/root"
dpkg -x "$deb" "$GO_DIR/root"

found=$(find "$GO_DIR/root" -type f -name 'GO.sqlite' -print -quit)
if [[ -z "$found" ]]; then
  log "error: no GO.sqlite inside $deb (looked under $GO_DIR/root)"
  exit 1
fi
ln -sf "$found" "$SQLITE_LINK"
printf '%s\n' "${deb#./}" > "$GO_DIR/SOURCE"
log "ready: $SQLITE_LINK -> $found"
printf '%s\n' "$SQLITE_LINK"
