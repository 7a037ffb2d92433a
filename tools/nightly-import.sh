#!/usr/bin/env bash
# Nightly term data import from a student information system into Kinpath.
#
#   KINPATH_URL=https://kinpath.halden.example KINPATH_TOKEN=kp_... \
#     tools/nightly-import.sh /srv/sis-export/2026-FA [report-dir]
#
# Uploads catalogue.csv, offerings.csv, students.csv and records.csv from the folder, in
# that order, each with commit=true, and waits for each import to end. A file committed
# before (same SHA-256) is skipped. The first file that is not committed stops the run
# (exit 1); its rejected rows are saved as CSV in report-dir (default: the folder). Needs
# curl and jq, and a script token with imports:write and imports:read.
set -euo pipefail

dir=${1:?usage: nightly-import.sh FOLDER [REPORT_DIR]}
reports=${2:-$dir}
url=${KINPATH_URL:?set KINPATH_URL, e.g. https://kinpath.halden.example}
: "${KINPATH_TOKEN:?set KINPATH_TOKEN to a script token (kp_...)}"
poll_seconds=${KINPATH_POLL_SECONDS:-5}

# The token goes to curl on standard input, so it never shows in the process list.
api() {
  curl --silent --show-error --fail-with-body --config - "$@" <<CONFIG
header = "Authorization: Bearer ${KINPATH_TOKEN}"
CONFIG
}

for kind in catalogue offerings students records; do
  file="$dir/$kind.csv"
  if [ ! -f "$file" ]; then
    echo "nightly import: $file is missing; nothing after it was imported." >&2
    exit 1
  fi
  if ! answer=$(api -F "kind=$kind" -F "commit=true" -F "file=@$file;type=text/csv" \
    "$url/api/imports"); then
    # The server refuses a file it has committed before (409, naming that import).
    if jq -e '.details.earlierImportId' <<<"$answer" >/dev/null 2>&1; then
      echo "nightly import: $kind is unchanged since its last import; skipped"
      continue
    fi
    echo "nightly import: $kind was refused: $(jq -r '.message // empty' <<<"$answer" 2>/dev/null)" >&2
    echo "nightly import: the files after $kind were not imported." >&2
    exit 1
  fi
  id=$(jq -r '.id' <<<"$answer")
  echo "nightly import: $kind uploaded as import $id"

  while :; do
    summary=$(api "$url/api/imports/$id")
    status=$(jq -r '.status' <<<"$summary")
    case "$status" in
      queued | validating | committing) sleep "$poll_seconds" ;;
      *) break ;;
    esac
  done

  if [ "$status" != committed ]; then
    report="$reports/rejected-$kind-$id.csv"
    api -H 'Accept: text/csv' -o "$report" "$url/api/imports/$id/errors"
    echo "nightly import: $kind was not committed ($status): $(jq -r '.message // ""' <<<"$summary")" >&2
    echo "nightly import: rejected rows saved in $report; the files after $kind were not imported." >&2
    exit 1
  fi
  echo "nightly import: $kind committed ($(jq -r '.rowsAccepted' <<<"$summary") rows)"
done
echo "nightly import: all four files are committed."
