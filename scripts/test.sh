#!/usr/bin/env bash
# npm test: unit, integration and browser tests against a fresh, throwaway stack.
# Extra arguments are passed to each vitest run (e.g. npm test -- -t "sign-in").
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
# shellcheck source=scripts/stack/deps.sh
. scripts/stack/deps.sh

need_node
need_node_modules
missing=()
have_postgres || missing+=(postgresql)
have_chromium || missing+=(chromium)
need_apt_packages "${missing[@]}"

exec node --import tsx scripts/stack.ts test "$@"
